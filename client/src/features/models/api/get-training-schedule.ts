import { queryOptions, useQuery } from '@tanstack/react-query';
import type { TrainingScheduleView } from '@shared/api/models';
import { api } from '@/lib/api-client';
import { TRAINING_KEY } from './get-training-runs';

/** GET /api/training/schedule: the retraining schedule with its next and last run. */
export function getTrainingSchedule(signal?: AbortSignal): Promise<TrainingScheduleView> {
  return api.get<TrainingScheduleView>('/api/training/schedule', { signal });
}

export function getTrainingScheduleQueryOptions() {
  return queryOptions({ queryKey: [...TRAINING_KEY, 'schedule'] as const, queryFn: ({ signal }) => getTrainingSchedule(signal) });
}

export function useTrainingSchedule() {
  return useQuery(getTrainingScheduleQueryOptions());
}
