import { useMutation, useQueryClient } from '@tanstack/react-query';
import { startTrainingSchema, type StartTrainingInput, type TrainingRun } from '@shared/api/models';
import { api } from '@/lib/api-client';
import { getTrainingRunQueryOptions } from './get-training-run';
import { getTrainingRunsQueryOptions } from './get-training-runs';

/** POST /api/training/runs: train now. */
export async function startTraining(input: StartTrainingInput): Promise<TrainingRun> {
  return (await api.post<{ run: TrainingRun }>('/api/training/runs', startTrainingSchema.parse(input))).run;
}

export function useStartTraining() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: startTraining,
    onSuccess: (run) => queryClient.setQueryData(getTrainingRunQueryOptions(run.id).queryKey, run),
    onSettled: () => queryClient.invalidateQueries({ queryKey: getTrainingRunsQueryOptions().queryKey }),
  });
}
