import { queryOptions, useQuery } from '@tanstack/react-query';
import type { TrainingRun } from '@shared/api/models';
import { api } from '@/lib/api-client';
import { MODELS_KEY } from './get-models';

export const TRAINING_KEY = [...MODELS_KEY, 'training'] as const;

/** GET /api/training/runs: recent runs, newest first (without curves). */
export async function getTrainingRuns(signal?: AbortSignal): Promise<TrainingRun[]> {
  return (await api.get<{ runs: TrainingRun[] }>('/api/training/runs', { signal })).runs;
}

export function getTrainingRunsQueryOptions() {
  return queryOptions({ queryKey: [...TRAINING_KEY, 'runs'] as const, queryFn: ({ signal }) => getTrainingRuns(signal) });
}

export function useTrainingRuns() {
  return useQuery(getTrainingRunsQueryOptions());
}
