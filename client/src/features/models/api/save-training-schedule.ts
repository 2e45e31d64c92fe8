import { useMutation, useQueryClient } from '@tanstack/react-query';
import { trainingScheduleSchema, type TrainingSchedule, type TrainingScheduleView } from '@shared/api/models';
import { api } from '@/lib/api-client';
import { getTrainingScheduleQueryOptions } from './get-training-schedule';

/** PUT /api/training/schedule: the server validates the pattern again and registers the job scheduler. */
export function saveTrainingSchedule(s: TrainingSchedule): Promise<TrainingScheduleView> {
  return api.put<TrainingScheduleView>('/api/training/schedule', trainingScheduleSchema.parse(s));
}

export function useSaveTrainingSchedule() {
  const queryClient = useQueryClient();
  const { queryKey } = getTrainingScheduleQueryOptions();
  return useMutation({
    mutationFn: saveTrainingSchedule,
    onSuccess: (view) => queryClient.setQueryData(queryKey, view),
    onSettled: () => queryClient.invalidateQueries({ queryKey }),
  });
}
