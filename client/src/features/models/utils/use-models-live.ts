import { useQueryClient } from '@tanstack/react-query';
import {
  DRIFT_REPORTED_EVENT,
  isFinished,
  MODELS_CHANGED_EVENT,
  PROMOTION_CHANGED_EVENT,
  TRAINING_PROGRESS_EVENT,
  type TrainingProgressEvent,
  type TrainingRun,
} from '@shared/api/models';
import { useSocketEvent } from '@/lib/socket';
import { MODELS_KEY, getModelsQueryOptions } from '../api/get-models';
import { getPromotionsQueryOptions } from '../api/get-promotions';
import { DRIFT_KEY } from '../api/get-drift-reports';
import { getTrainingRunQueryOptions } from '../api/get-training-run';
import { getTrainingRunsQueryOptions } from '../api/get-training-runs';

/** A run as it stands after a progress event: points appended in round order, never twice. */
export function applyProgress(run: TrainingRun, e: TrainingProgressEvent): TrainingRun {
  const last = run.curve.length > 0 ? run.curve[run.curve.length - 1].round : 0;
  return {
    ...run,
    status: e.status,
    progress: { round: e.round, totalRounds: e.totalRounds, trainLoss: e.trainLoss, validationLoss: e.validationLoss, phase: e.phase },
    curve: [...run.curve, ...e.points.filter((p) => p.round > last)],
    modelVersionId: e.modelVersionId,
    error: e.error,
    finishedAt: isFinished(e.status) ? (run.finishedAt ?? e.at) : run.finishedAt,
  };
}

/** Writes a run's progress events into its cache entry as they arrive, so its curve draws without refetching. */
export function useTrainingRunLive(runId: number) {
  const queryClient = useQueryClient();
  useSocketEvent<[TrainingProgressEvent]>(TRAINING_PROGRESS_EVENT, (e) => {
    if (e.runId !== runId) return;
    const key = getTrainingRunQueryOptions(runId).queryKey;
    const before = queryClient.getQueryData<TrainingRun>(key);
    if (before) queryClient.setQueryData<TrainingRun>(key, applyProgress(before, e));
    else void queryClient.invalidateQueries({ queryKey: key });
  });
}

/**
 * Keeps the Models screen's lists fresh: a run that starts or ends, a
 * promotion, a role change or a drift report refetches what it makes stale.
 */
export function useModelsLive() {
  const queryClient = useQueryClient();
  useSocketEvent<[TrainingProgressEvent]>(TRAINING_PROGRESS_EVENT, (e) => {
    const listed = queryClient.getQueryData<TrainingRun[]>(getTrainingRunsQueryOptions().queryKey)?.find((r) => r.id === e.runId);
    if (listed?.status === e.status) return;
    void queryClient.invalidateQueries({ queryKey: getTrainingRunsQueryOptions().queryKey });
    if (e.status === 'completed') void queryClient.invalidateQueries({ queryKey: getModelsQueryOptions().queryKey });
  });
  useSocketEvent(MODELS_CHANGED_EVENT, () => void queryClient.invalidateQueries({ queryKey: MODELS_KEY }));
  useSocketEvent(PROMOTION_CHANGED_EVENT, () => void queryClient.invalidateQueries({ queryKey: getPromotionsQueryOptions().queryKey }));
  useSocketEvent(DRIFT_REPORTED_EVENT, () => void queryClient.invalidateQueries({ queryKey: DRIFT_KEY }));
}
