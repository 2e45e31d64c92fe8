import { UnrecoverableError, Worker, type Job } from 'bullmq';
import type { Redis } from 'ioredis';
import type { Config } from '../../server/src/config/index';
import type { Database } from '../../server/src/db/database';
import { createRedis } from '../../server/src/lib/redis';
import { logger } from '../../server/src/lib/logger';
import { subscribeEvents } from '../../server/src/events/event-bus';
import { TrainingQueue } from '../../server/src/training/training-queue';
import { readSchedule } from '../../server/src/training/training-schedule';
import { createScheduledRun, failUnfinishedRun, INTERRUPTED_RUN_ERROR, runTraining, type TrainingJobDeps } from '../../server/src/training/run-training-job';
import { threadTrainer } from '../../server/src/training/thread-trainer';
import type { Trainer } from '../../server/src/training/train-model-version';
import { QUEUES, trainingJobSchema, type TrainingJob } from '@shared/jobs/queues';
import { workerOptions } from './lib/worker-options';

/**
 * Locks of a training job. Boosting runs in a thread, so this process's event
 * loop stays free to renew the lock (every half lock); the longest stretch it
 * is busy is reading the data set and evaluating, seconds even for the demo's
 * history, well inside half a lock. If the process dies, BullMQ finds the job
 * stalled once the lock has lapsed, within about a lock and two stalled
 * checks (under a minute, not the several minutes of a long lock), and hands
 * it to a training worker, which ends the run as failed with a reason
 * (runTraining); a second stall fails the job, and the 'failed' handler below
 * does the same. One stall allowed: an interrupted run is not trained again
 * on its own (a process killed for memory would be killed again).
 */
const TRAINING_LOCKS = { lockDuration: 30_000, stalledInterval: 15_000, maxStalledCount: 1 };

export interface TrainingWorkerOptions {
  /** How boosting runs; default a worker thread (so this process keeps answering while rounds run). */
  trainer?: Trainer;
}

/**
 * Training runs, one at a time per process. On start it registers the
 * nightly job scheduler from the saved schedule (a fixed scheduler id, so
 * however many processes start there is one schedule, and a Redis that lost
 * it gets it back). Boosting runs in a worker thread; a cancel request
 * (socket event from any web server, or the run row) stops it after the
 * current round.
 */
export async function createTrainingWorker(
  c: Config,
  db: Database,
  o: TrainingWorkerOptions = {},
): Promise<{ worker: Worker<TrainingJob>; scheduler: TrainingQueue; close(): Promise<void> }> {
  const redis: Redis = createRedis(c, { name: 'training-events' });
  const subscriber: Redis = createRedis(c, { name: 'training-subscriber', forBullmq: true });
  const scheduler = new TrainingQueue(c, { failFast: false, name: 'training-scheduler' });
  await scheduler.applySchedule((await readSchedule(db, c)).schedule);

  const running = new Map<number, AbortController>();
  await subscribeEvents(subscriber, c.REDIS_PREFIX, (e) => {
    if (e.type === 'training.cancel') running.get(e.runId)?.abort();
  });
  const deps: TrainingJobDeps = { db, redis, config: c, trainer: o.trainer ?? threadTrainer };

  const worker = new Worker<TrainingJob, { status: string; modelVersionId: number | null }>(
    QUEUES.training,
    async (job: Job<TrainingJob>) => {
      const parsed = trainingJobSchema.safeParse(job.data);
      if (!parsed.success) throw new UnrecoverableError(`invalid training job: ${parsed.error.issues[0]?.message ?? 'bad payload'}`);
      let runId: number;
      if ('runId' in parsed.data) runId = parsed.data.runId;
      else {
        runId = await createScheduledRun(deps);
        // From now on the job names its run, so a job that comes back after its process died ends this run, not a new one.
        await job.updateData({ runId });
      }
      const controller = new AbortController();
      running.set(runId, controller);
      try {
        const result = await runTraining(deps, runId, controller.signal);
        logger().info({ runId, status: result.status, modelVersionId: result.modelVersionId }, 'training run finished');
        return result;
      } finally {
        running.delete(runId);
      }
    },
    // One run at a time keeps the two cores for scoring.
    { ...workerOptions(c, 'training', 1), ...TRAINING_LOCKS },
  );
  // A job that failed without its run ending (it stalled once too often, or the processor itself threw):
  // the run says so instead of staying "running".
  worker.on('failed', (job, err) => {
    const data = job?.data as Partial<{ runId: number }> | undefined;
    if (typeof data?.runId !== 'number') return;
    const error = /stalled/i.test(err.message) ? INTERRUPTED_RUN_ERROR : 'The run stopped because of a problem on our side; see the worker log.';
    void failUnfinishedRun(deps, data.runId, error).catch((e: Error) => logger().warn({ runId: data.runId, err: e.message }, 'training run not marked failed'));
  });
  return {
    worker,
    scheduler,
    async close() {
      for (const ctl of running.values()) ctl.abort();
      await worker.close();
      await scheduler.close();
      subscriber.disconnect();
      redis.disconnect();
    },
  };
}
