import { Queue } from 'bullmq';
import type { Config } from '../config/index';
import { createRedis } from '../lib/redis';
import { QUEUES, type ScoringJob } from '@shared/jobs/queues';

/** Producer side of the scoring queue. Job payloads carry internal ids only. */
/** Stored-but-unqueued batches kept for a retry at most; beyond that the requeue sweeper alone catches up. */
const MAX_BACKLOG = 10_000;

export class ScoringQueue {
  readonly queue: Queue<ScoringJob>;
  private readonly backlog = new Map<string, ScoringJob>();
  private retryTimer: NodeJS.Timeout | null = null;
  private flushing = false;

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

  /**
   * A batch that was stored but could not be queued (Redis went away between
   * the two): this process tries again every second until Redis takes it, so
   * it is scored as soon as Redis is back. The job id is the batch, so a batch
   * is never queued twice. Best effort: if this process stops first, the
   * requeue sweeper queues the rows.
   */
  enqueueLater(job: ScoringJob): void {
    if (this.backlog.size >= MAX_BACKLOG) return;
    this.backlog.set(job.batch, job);
    if (!this.retryTimer) {
      this.retryTimer = setInterval(() => void this.flushBacklog(), 1_000);
      this.retryTimer.unref();
    }
  }

  private async flushBacklog(): Promise<void> {
    if (this.flushing) return;
    this.flushing = true;
    try {
      for (const [batch, job] of this.backlog) {
        await this.enqueue(job);
        this.backlog.delete(batch);
      }
    } catch {
      // Still unavailable: next second.
    } finally {
      this.flushing = false;
    }
    if (this.backlog.size === 0 && this.retryTimer) {
      clearInterval(this.retryTimer);
      this.retryTimer = null;
    }
  }

  close(): Promise<void> {
    if (this.retryTimer) clearInterval(this.retryTimer);
    this.retryTimer = null;
    return this.queue.close();
  }
}
