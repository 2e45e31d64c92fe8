import { UnrecoverableError, Worker, type Job } from 'bullmq';
import type { Redis } from 'ioredis';
import type { Config } from '../../server/src/config/index';
import type { Database } from '../../server/src/db/database';
import { createRedis } from '../../server/src/lib/redis';
import { logger } from '../../server/src/lib/logger';
import { subscribeEvents } from '../../server/src/events/event-bus';
import { TrainingQueue } from '../../server/src/training/training-queue';
import { readSchedule } from '../../server/src/training/training-schedule';
import { createScheduledRun, runTraining, type TrainingJobDeps } from '../../server/src/training/run-training-job';
import { threadTrainer } from '../../server/src/training/thread-trainer';
import type { Trainer } from '../../server/src/training/train-model-version';
import { QUEUES, trainingJobSchema, type TrainingJob } from '@shared/jobs/queues';
import { workerOptions } from './lib/worker-options';

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
      const runId = 'runId' in parsed.data ? parsed.data.runId : await createScheduledRun(deps);
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
    // Rounds run in a thread, so the lock is renewed as usual; one run at a time keeps the two cores for scoring.
    { ...workerOptions(c, 'training', 1), lockDuration: 60_000 },
  );
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
