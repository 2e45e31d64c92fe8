import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { SupervisionSettingsResponse, ThresholdInput } from '@shared/api/supervision';
import { api } from '@/lib/api-client';
import { boardQueryOptions } from './get-board';
import { settingsQueryOptions } from './get-settings';
import { thresholdCurveKey } from './get-threshold-curve';

/** PUT /api/settings/threshold: the scoring worker alerts on the new threshold from the next transaction. */
export function saveThreshold(input: ThresholdInput): Promise<SupervisionSettingsResponse> {
  return api.put<SupervisionSettingsResponse>('/api/settings/threshold', input);
}

export function useSaveThreshold() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: saveThreshold,
    onSuccess: (settings) => queryClient.setQueryData(settingsQueryOptions().queryKey, settings),
    onSettled: () => {
      void queryClient.invalidateQueries({ queryKey: settingsQueryOptions().queryKey });
      void queryClient.invalidateQueries({ queryKey: thresholdCurveKey });
      void queryClient.invalidateQueries({ queryKey: boardQueryOptions().queryKey });
    },
  });
}
