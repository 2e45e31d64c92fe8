import { queryOptions, useQuery } from '@tanstack/react-query';
import type { TrainingRun } from '@shared/api/models';
import { api } from '@/lib/api-client';
import { TRAINING_KEY } from './get-training-runs';

/** GET /api/training/runs/:id: one run with its progress and the loss curve so far. */
export async function getTrainingRun(id: number, signal?: AbortSignal): Promise<TrainingRun> {
  return (await api.get<{ run: TrainingRun }>(`/api/training/runs/${id}`, { signal })).run;
}

export function getTrainingRunQueryOptions(id: number) {
  // Live progress arrives over the socket and is written into this cache entry.
  return queryOptions({ queryKey: [...TRAINING_KEY, 'run', id] as const, queryFn: ({ signal }) => getTrainingRun(id, signal), staleTime: Infinity });
}

export function useTrainingRun(id: number) {
  return useQuery(getTrainingRunQueryOptions(id));
}
