import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { TrainingRun } from '@shared/api/models';
import { api } from '@/lib/api-client';
import { getTrainingRunQueryOptions } from './get-training-run';
import { getTrainingRunsQueryOptions } from './get-training-runs';

/** POST /api/training/runs/:id/cancel: a running run stops after its current round; nothing is registered. */
export async function cancelTraining(id: number): Promise<TrainingRun> {
  return (await api.post<{ run: TrainingRun }>(`/api/training/runs/${id}/cancel`, {})).run;
}

export function useCancelTraining() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: cancelTraining,
    onSuccess: (run) =>
      queryClient.setQueryData(getTrainingRunQueryOptions(run.id).queryKey, (old: TrainingRun | undefined) => (old ? { ...run, curve: old.curve.length > run.curve.length ? old.curve : run.curve } : run)),
    onSettled: () => queryClient.invalidateQueries({ queryKey: getTrainingRunsQueryOptions().queryKey }),
  });
}
