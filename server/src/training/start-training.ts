import type { Request } from 'express';
import type { Redis } from 'ioredis';
import { QueryTypes } from 'sequelize';
import type { Database } from '../db/database';
import type { Config } from '../config/index';
import type { StartTrainingInput, TrainingParams, TrainingRun, TrainingSchedule, TrainingScheduleView } from '@shared/api/models';
import { AppError } from '../lib/app-error';
import { logger } from '../lib/logger';
import { auditRequest } from '../audit/record-audit';
import { publishEvents } from '../events/event-bus';
import type { TrainingQueue } from './training-queue';
import { createRun, findRun, finishRun, lastScheduledRun, requestCancel, setJobId } from './training-run-repository';
import { readSchedule, writeSchedule } from './training-schedule';

export interface TrainingDeps {
  db: Database;
  redis: Redis;
  config: Config;
  queue: TrainingQueue;
}

/** "Train now": records the run with its parameters (the schedule's unless given) and queues it. */
export async function startTraining(d: TrainingDeps, req: Request, input: StartTrainingInput): Promise<TrainingRun> {
  const { schedule } = await readSchedule(d.db, d.config);
  const to = input.to ? new Date(input.to) : new Date();
  const params: TrainingParams = {
    from: new Date(to.getTime() - (input.windowDays ?? schedule.windowDays) * 86_400_000).toISOString(),
    to: to.toISOString(),
    rounds: input.rounds ?? schedule.rounds,
    labelDelayDays: input.labelDelayDays ?? schedule.labelDelayDays,
    shrinkage: input.shrinkage ?? 0.5,
    label: input.label ?? null,
    notes: input.notes || null,
  };
  if (params.label) {
    const [taken] = await d.db.sequelize.query('SELECT id FROM model_versions WHERE label = ?', { replacements: [params.label], type: QueryTypes.SELECT });
    if (taken) throw AppError.conflict(`A version named ${params.label} exists already: choose another label.`, 'label_taken');
  }
  const id = await createRun(d.db, { trigger: 'manual', requestedBy: req.user!.id, params });
  try {
    await setJobId(d.db, id, await d.queue.enqueueRun(id));
  } catch (err) {
    logger().warn({ err: (err as Error).message, runId: id }, 'training job not queued');
    await finishRun(d.db, id, { status: 'failed', error: 'The job queue could not take the run (Redis unreachable).' });
    throw AppError.unavailable('The training queue is unreachable right now; try again in a moment.');
  }
  await auditRequest(d.db, req, { action: 'training.start', targetType: 'training_run', targetId: id, outcome: 'success', details: { ...params } });
  return (await findRun(d.db, id))!;
}

/** Cancels a queued run at once, or asks the worker to stop a running one after its current round. */
export async function cancelTraining(d: TrainingDeps, req: Request, id: number): Promise<TrainingRun> {
  const outcome = await requestCancel(d.db, id);
  if (outcome === 'missing') throw AppError.notFound('No such training run.');
  if (outcome === 'finished') throw AppError.conflict('This run has finished already.', 'run_finished');
  const at = new Date().toISOString();
  if (outcome === 'cancelled') {
    await d.queue.removeWaiting(id).catch(() => undefined);
    const run = (await findRun(d.db, id))!;
    await publishEvents(d.redis, d.config.REDIS_PREFIX, [
      { type: 'training.progress', runId: id, status: 'cancelled', ...run.progress, points: [], modelVersionId: null, error: null, at },
    ]).catch(() => undefined);
  } else {
    await publishEvents(d.redis, d.config.REDIS_PREFIX, [{ type: 'training.cancel', runId: id, at }]).catch(() => undefined);
  }
  await auditRequest(d.db, req, { action: 'training.cancel', targetType: 'training_run', targetId: id, outcome: 'success', details: { when: outcome === 'cancelled' ? 'before start' : 'while running' } });
  return (await findRun(d.db, id))!;
}

export async function scheduleView(d: TrainingDeps): Promise<TrainingScheduleView> {
  const stored = await readSchedule(d.db, d.config);
  const last = await lastScheduledRun(d.db);
  const nextRunAt = stored.schedule.enabled ? await d.queue.nextRunAt().catch(() => null) : null;
  return {
    ...stored,
    nextRunAt,
    lastRun: last ? { id: last.id, status: last.status, createdAt: last.createdAt, finishedAt: last.finishedAt } : null,
  };
}

/**
 * Saves the schedule and registers it with the job scheduler (one fixed
 * scheduler id: saving again replaces it). The scheduler is updated first, so
 * a pattern it refuses is never saved.
 */
export async function updateSchedule(d: TrainingDeps, req: Request, s: TrainingSchedule): Promise<TrainingScheduleView> {
  const before = (await readSchedule(d.db, d.config)).schedule;
  try {
    await d.queue.applySchedule(s);
  } catch (err) {
    throw AppError.badRequest('The job scheduler refused this schedule.', [{ path: 'cron', message: (err as Error).message.slice(0, 200) }]);
  }
  await writeSchedule(d.db, s, req.user!.id);
  await auditRequest(d.db, req, { action: 'training.schedule', targetType: 'setting', targetId: 'training-schedule', outcome: 'success', details: { before, after: s } });
  return scheduleView(d);
}
