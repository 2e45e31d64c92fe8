import { Queue } from 'bullmq';
import type { Config } from '../config/index';
import { createRedis } from '../lib/redis';
import { QUEUES, type DriftJob } from '@shared/jobs/queues';

export const DAILY_DRIFT_SCHEDULER_ID = 'daily-drift-report';
/** Every day at 03:20 UTC, after the nightly retraining has usually finished. */
export const DAILY_DRIFT_PATTERN = '20 3 * * *';

/** The producer side of the drift queue and its daily scheduler. */
export class DriftQueue {
  readonly queue: Queue<DriftJob>;

  constructor(c: Config, opts: { failFast?: boolean; name?: string } = {}) {
    this.queue = new Queue<DriftJob>(QUEUES.drift, {
      connection: createRedis(c, { forBullmq: true, failFast: opts.failFast ?? true, name: opts.name ?? 'drift-producer' }),
      prefix: c.REDIS_PREFIX,
      defaultJobOptions: { attempts: 3, backoff: { type: 'exponential', delay: 30_000 }, removeOnComplete: { count: 100 }, removeOnFail: { count: 100 } },
    });
  }

  async runNow(requestedBy?: number): Promise<string> {
    const job = await this.queue.add('drift-report', { task: 'drift-report', ...(requestedBy ? { requestedBy } : {}) });
    return job.id ?? '';
  }

  /** One daily scheduler whatever the number of worker processes (a fixed id, upserted). */
  async applyDailySchedule(): Promise<void> {
    await this.queue.upsertJobScheduler(DAILY_DRIFT_SCHEDULER_ID, { pattern: DAILY_DRIFT_PATTERN, tz: 'UTC' }, { name: 'drift-report', data: { task: 'drift-report' } });
  }

  close(): Promise<void> {
    return this.queue.close();
  }
}
