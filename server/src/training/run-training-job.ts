import type { Redis } from 'ioredis';
import type { Database } from '../db/database';
import type { Config } from '../config/index';
import type { LossPoint, TrainingParams, TrainingProgress, TrainingStatus } from '@shared/api/models';
import { ModelError } from '@shared/model/index';
import { logger } from '../lib/logger';
import { appendAudit } from '../audit/audit-repository';
import { publishEvents, type DomainEvent } from '../events/event-bus';
import { makeChallenger } from '../model-registry/version-repository';
import { TrainingCancelled, trainModelVersion, type Trainer } from './train-model-version';
import { createRun, finishRun, findRun, markRunning, saveProgress, stopRequested } from './training-run-repository';
import { readSchedule } from './training-schedule';

/** Progress events at most this often (a few per second); the last one always goes out. */
export const PROGRESS_EVENT_MS = 250;
/** The curve is saved with the run this often, so a page opened mid-run can draw it. */
const SAVE_MS = 1_000;
/** A running run touches its row at least this often (the data set can take a while to read). */
const HEARTBEAT_MS = 20_000;
/** How often the run row is checked for a cancel request or an end decided elsewhere (the socket event is the fast path). */
const CANCEL_POLL_MS = 2_000;

export interface TrainingJobDeps {
  db: Database;
  redis: Redis;
  config: Pick<Config, 'REDIS_PREFIX' | 'LABEL_DELAY_DAYS'>;
  /** How boosting runs (the worker uses a worker thread); default in this thread. */
  trainer?: Trainer;
}

export function defaultLabel(runId: number, at: Date): string {
  return `r${runId}-${at.toISOString().slice(0, 10)}`;
}

/** Records the run the nightly schedule asks for, with the schedule's parameters as they are now. */
export async function createScheduledRun(d: TrainingJobDeps, now = new Date()): Promise<number> {
  const { schedule } = await readSchedule(d.db, d.config);
  const params: TrainingParams = {
    from: new Date(now.getTime() - schedule.windowDays * 86_400_000).toISOString(),
    to: now.toISOString(),
    rounds: schedule.rounds,
    labelDelayDays: schedule.labelDelayDays,
    shrinkage: 0.5,
    label: null,
    notes: 'Nightly retraining (schedule).',
  };
  return createRun(d.db, { trigger: 'schedule', requestedBy: null, params });
}

function readableError(err: unknown): string {
  if (err instanceof ModelError) return err.message;
  if (err instanceof Error && /Duplicate entry .* for key 'label'/i.test(err.message)) return 'A version with this label exists already: choose another label.';
  return 'The run stopped because of a problem on our side; see the worker log.';
}

/**
 * One training run, start to finish: builds the data set, boosts (progress
 * over the socket, every round), calibrates, evaluates, registers the result
 * as the challenger and tells the scoring workers. Cancellation (through the
 * signal, or a request stored on the run) stops after the current round and
 * registers nothing.
 */
/** What a run says when its training process ended in the middle of it. */
export const INTERRUPTED_RUN_ERROR = 'The training process ended in the middle of this run (stopped or killed); nothing was registered. Start the run again.';

/**
 * Ends a run that is still queued or running as failed, with `error`, and
 * tells the open pages; false when it had ended already. For a run whose
 * process died: its job comes back to a training worker once BullMQ finds
 * the job's lock lapsed (a stalled job), or fails for good.
 */
export async function failUnfinishedRun(d: Pick<TrainingJobDeps, 'db' | 'redis' | 'config'>, runId: number, error = INTERRUPTED_RUN_ERROR): Promise<boolean> {
  if (!(await finishRun(d.db, runId, { status: 'failed', error }))) return false;
  logger().warn({ runId, error }, 'training run ended as failed: its job was taken back from a process that stopped');
  const run = await findRun(d.db, runId);
  if (run) {
    await publishEvents(d.redis, d.config.REDIS_PREFIX, [
      { type: 'training.progress', runId, status: 'failed', ...run.progress, points: [], modelVersionId: null, error, at: new Date().toISOString() },
    ]).catch(() => undefined);
  }
  return true;
}

export async function runTraining(d: TrainingJobDeps, runId: number, external?: AbortSignal): Promise<{ status: TrainingStatus | 'skipped'; modelVersionId: number | null }> {
  if (!(await markRunning(d.db, runId))) {
    // No longer queued. Still running means an earlier start of this job died with its process (the job came
    // back as stalled): the run ends as failed, visibly, rather than staying "running" for ever.
    if (await failUnfinishedRun(d, runId)) return { status: 'failed', modelVersionId: null };
    return { status: 'skipped', modelVersionId: null };
  }
  const run = (await findRun(d.db, runId))!;
  const p = run.params;
  const controller = new AbortController();
  const onExternalAbort = () => controller.abort();
  external?.addEventListener('abort', onExternalAbort);
  if (external?.aborted) controller.abort();

  const progress: TrainingProgress = { round: 0, totalRounds: p.rounds, trainLoss: null, validationLoss: null, phase: 'starting' };
  const curve: LossPoint[] = [];
  let sentUpTo = 0;
  let lastEmit = 0;
  let lastSave = 0;
  let status: TrainingStatus = 'running';
  let modelVersionId: number | null = null;
  let error: string | null = null;

  const publish = (events: DomainEvent[]) => publishEvents(d.redis, d.config.REDIS_PREFIX, events).catch(() => undefined);
  const emit = () => {
    lastEmit = Date.now();
    const points = curve.slice(sentUpTo);
    sentUpTo = curve.length;
    void publish([{ type: 'training.progress', runId, status, ...progress, points, modelVersionId, error, at: new Date().toISOString() }]);
  };
  const save = (withCurve: boolean) => {
    lastSave = Date.now();
    return saveProgress(d.db, runId, progress, withCurve ? curve : null).catch((err: Error) => logger().warn({ err: err.message, runId }, 'training progress not saved'));
  };
  const heartbeat = setInterval(() => void save(false), HEARTBEAT_MS);
  const cancelPoll = setInterval(() => {
    void stopRequested(d.db, runId).then((yes) => yes && controller.abort(), () => undefined);
  }, CANCEL_POLL_MS);
  emit();

  try {
    const outcome = await trainModelVersion(d.db, {
      label: p.label ?? defaultLabel(runId, new Date(run.createdAt)),
      role: 'candidate',
      from: new Date(p.from),
      to: new Date(p.to),
      labelsAsOf: new Date(),
      labelDelayDays: p.labelDelayDays,
      options: { rounds: p.rounds, shrinkage: p.shrinkage },
      createdBy: run.requestedBy?.id ?? null,
      notes: p.notes ?? undefined,
      signal: controller.signal,
      trainer: d.trainer,
      onPhase: (phase) => {
        progress.phase = phase;
        emit();
        void save(false);
      },
      onRound: (t, total) => {
        curve.push({ round: t.round, trainLoss: t.trainLoss, validationLoss: t.validationLoss });
        Object.assign(progress, { round: t.round, totalRounds: total, trainLoss: t.trainLoss, validationLoss: t.validationLoss });
        const now = Date.now();
        if (now - lastEmit >= PROGRESS_EVENT_MS) emit();
        if (now - lastSave >= SAVE_MS) void save(true);
      },
    });
    modelVersionId = outcome.modelVersionId;
    await makeChallenger(d.db, modelVersionId);
    status = 'completed';
    progress.phase = 'registered as challenger';
    await appendAudit(d.db, {
      actorType: run.requestedBy ? 'user' : 'system',
      actorId: run.requestedBy?.id ?? null,
      actorLabel: run.requestedBy?.displayName ?? 'training schedule',
      action: 'model.register',
      targetType: 'model_version',
      targetId: modelVersionId,
      outcome: 'success',
      details: { role: 'challenger', runId, rows: outcome.counts.rows, fraud: outcome.counts.fraud, rounds: outcome.model.stumps.length, testRocAuc: outcome.evaluation.rocAuc },
    });
    await publish([{ type: 'model.changed', at: new Date().toISOString() }]);
  } catch (err) {
    if (err instanceof TrainingCancelled) {
      status = 'cancelled';
      progress.phase = 'cancelled';
    } else {
      status = 'failed';
      error = readableError(err);
      progress.phase = 'failed';
      if (!(err instanceof ModelError)) logger().error({ err, runId }, 'training run failed');
    }
  } finally {
    clearInterval(heartbeat);
    clearInterval(cancelPoll);
    external?.removeEventListener('abort', onExternalAbort);
  }
  await save(true);
  // Not ended here when another process ended it first (see failUnfinishedRun): what that one said stands.
  if (await finishRun(d.db, runId, { status: status as 'completed' | 'failed' | 'cancelled', modelVersionId, error })) emit();
  return { status, modelVersionId };
}
