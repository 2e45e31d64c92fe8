import { Queue } from 'bullmq';
import type { Config } from '../config/index';
import { createRedis } from '../lib/redis';
import { QUEUES, type ScoringJob } from '@shared/jobs/queues';

/** Producer side of the scoring queue. Job payloads carry internal ids only. */
export class ScoringQueue {
  readonly queue: Queue<ScoringJob>;

  constructor(c: Config) {
    // Fail fast instead of queueing commands while Redis is down: ingest must answer 503, not hang.
    const connection = createRedis(c, { forBullmq: true, failFast: true, name: 'web-scoring-producer' });
    this.queue = new Queue<ScoringJob>(QUEUES.scoring, {
      connection,
      prefix: c.REDIS_PREFIX,
      defaultJobOptions: {
        attempts: 20,
        backoff: { type: 'exponential', delay: 500 },
        removeOnComplete: { age: 3_600, count: 10_000 },
        removeOnFail: { age: 7 * 86_400 },
      },
    });
  }

  async enqueue(job: ScoringJob): Promise<void> {
    await this.queue.add('score', job, { jobId: job.batch });
  }

  close(): Promise<void> {
    return this.queue.close();
  }
}
