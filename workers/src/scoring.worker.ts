import { DelayedError, UnrecoverableError, Worker, type Job } from 'bullmq';
import type { Redis } from 'ioredis';
import type { Config } from '../../server/src/config/index';
import type { Database } from '../../server/src/db/database';
import { createRedis } from '../../server/src/lib/redis';
import { ActiveModels } from '../../server/src/scoring/active-models';
import { scoreTransactions } from '../../server/src/scoring/score-transactions';
import { VelocityStore } from '../../server/src/scoring/velocity';
import { subscribeEvents } from '../../server/src/events/event-bus';
import { QUEUES, scoringJobSchema, type ScoringJob } from '@shared/jobs/queues';
import { workerOptions } from './lib/worker-options';

/**
 * A scoring job takes milliseconds, so a short lock lets another worker take
 * over the jobs of one that crashed within seconds instead of a minute (the
 * lock is renewed every half lock while a job runs). A job that stalls more
 * than once still retries: scoring is idempotent, so running one twice is safe.
 */
const SCORING_LOCKS = { lockDuration: 10_000, stalledInterval: 5_000, maxStalledCount: 5 };

export async function createScoringWorker(c: Config, db: Database, concurrency = 4): Promise<{ worker: Worker<ScoringJob>; close(): Promise<void> }> {
  const redis: Redis = createRedis(c, { name: 'scoring-velocity' });
  const subscriber: Redis = createRedis(c, { name: 'scoring-events', forBullmq: true });
  const velocity = new VelocityStore(redis, c.REDIS_PREFIX);
  const active = new ActiveModels(db).start();
  await subscribeEvents(subscriber, c.REDIS_PREFIX, (e) => {
    if (e.type === 'model.changed' || e.type === 'settings.changed') active.invalidate();
  });

  const worker = new Worker<ScoringJob, { scored: number; alerted: number }>(
    QUEUES.scoring,
    async (job: Job<ScoringJob>, token?: string) => {
      const parsed = scoringJobSchema.safeParse(job.data);
      if (!parsed.success) throw new UnrecoverableError(`invalid scoring job: ${parsed.error.issues[0]?.message ?? 'bad payload'}`);
      const { champion, challenger, settings } = await active.current();
      if (!champion) {
        // Nothing to score with yet (first start before the first training run): wait, do not fail.
        await job.moveToDelayed(Date.now() + 10_000, token);
        throw new DelayedError();
      }
      const outcomes = await scoreTransactions(
        { db, redis, redisPrefix: c.REDIS_PREFIX, velocity, champion, challenger, settings },
        parsed.data.transactionIds,
      );
      return { scored: outcomes.length, alerted: outcomes.filter((o) => o.alerted).length };
    },
    { ...workerOptions(c, 'scoring', concurrency), ...SCORING_LOCKS },
  );
  return {
    worker,
    async close() {
      await worker.close();
      active.close();
      subscriber.disconnect();
      redis.disconnect();
    },
  };
}
