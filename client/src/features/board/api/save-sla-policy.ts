import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { SlaPolicyInput, SupervisionSettingsResponse } from '@shared/api/supervision';
import { api } from '@/lib/api-client';
import { settingsQueryOptions } from './get-settings';

/** PUT /api/settings/sla: minutes per priority and the probability bands that set a case's priority. */
export function saveSlaPolicy(input: SlaPolicyInput): Promise<SupervisionSettingsResponse> {
  return api.put<SupervisionSettingsResponse>('/api/settings/sla', input);
}

export function useSaveSlaPolicy() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: saveSlaPolicy,
    onSuccess: (settings) => queryClient.setQueryData(settingsQueryOptions().queryKey, settings),
    onSettled: () => void queryClient.invalidateQueries({ queryKey: settingsQueryOptions().queryKey }),
  });
}
