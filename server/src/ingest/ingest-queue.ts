import { Queue } from 'bullmq';
import type { Config } from '../config/index';
import { createRedis } from '../lib/redis';
import { QUEUES, type ScoringJob } from '@shared/jobs/queues';

/** Stored-but-unqueued batches kept for a retry at most; beyond that the requeue sweeper alone catches up. */
const MAX_BACKLOG = 10_000;
/** Transaction ids per scoring job at most. */
export const MAX_JOB_IDS = 1000;
/**
 * How long the ids of small ingest groups are gathered into one job. A job costs the workers a fixed
 * amount (queue scripts, one database transaction of six statements or so) whatever its size, so
 * under a stream of single-transaction requests one job per group of a few would spend most of the
 * workers' time on that; gathered for a few milliseconds, a job carries tens of them.
 */
const GATHER_MS = 15;

/** Producer side of the scoring queue. Job payloads carry internal ids only. */
export class ScoringQueue {
  readonly queue: Queue<ScoringJob>;
  private readonly backlog = new Map<string, ScoringJob>();
  private retryTimer: NodeJS.Timeout | null = null;
  private flushing = false;
  private gathered: ScoringJob | null = null;
  private gatherTimer: NodeJS.Timeout | null = null;
  private readonly sending = new Set<Promise<void>>();

  constructor(
    c: Config,
    private readonly opts: { gatherMs: number } = { gatherMs: GATHER_MS },
  ) {
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
   * Queues the ids of a stored batch within the next few milliseconds, in one job with those of the
   * batches stored meanwhile (the first batch names it, so it is queued once). The caller does not
   * wait: the rows are committed, so they are kept; a job Redis refuses is retried from here
   * (enqueueLater) and, if this process stops first, by the requeue sweeper.
   */
  enqueueSoon(job: ScoringJob): void {
    if (this.gathered && this.gathered.transactionIds.length + job.transactionIds.length > MAX_JOB_IDS) this.sendGathered();
    if (!this.gathered) this.gathered = { transactionIds: [], batch: job.batch };
    for (const id of job.transactionIds) this.gathered.transactionIds.push(id);
    if (this.gathered.transactionIds.length >= MAX_JOB_IDS) this.sendGathered();
    else this.gatherTimer ??= setTimeout(() => this.sendGathered(), this.opts.gatherMs);
  }

  private sendGathered(): void {
    if (this.gatherTimer) clearTimeout(this.gatherTimer);
    this.gatherTimer = null;
    const job = this.gathered;
    this.gathered = null;
    if (!job || job.transactionIds.length === 0) return;
    const sent: Promise<void> = this.enqueue(job)
      .catch(() => this.enqueueLater(job))
      .finally(() => this.sending.delete(sent));
    this.sending.add(sent);
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

  async close(): Promise<void> {
    // What was gathered goes out now rather than waiting for the sweeper.
    this.sendGathered();
    await Promise.allSettled([...this.sending]);
    if (this.retryTimer) clearInterval(this.retryTimer);
    this.retryTimer = null;
    await this.queue.close();
  }
}
