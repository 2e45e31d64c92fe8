import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { SupervisionSettingsResponse } from '@shared/api/supervision';
import { api } from '@/lib/api-client';
import { settingsQueryOptions } from './get-settings';

/** PUT /api/settings/approval-limit: above this amount at risk a disposition waits for a second person (null: off). */
export function saveApprovalLimit(approvalLimit: number | null): Promise<SupervisionSettingsResponse> {
  return api.put<SupervisionSettingsResponse>('/api/settings/approval-limit', { approvalLimit });
}

export function useSaveApprovalLimit() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: saveApprovalLimit,
    onSuccess: (settings) => queryClient.setQueryData(settingsQueryOptions().queryKey, settings),
    onSettled: () => void queryClient.invalidateQueries({ queryKey: settingsQueryOptions().queryKey }),
  });
}
