import { Queue } from 'bullmq';
import type { Config } from '../config/index';
import { createRedis } from '../lib/redis';
import { QUEUES, type TrainingJob } from '@shared/jobs/queues';
import type { TrainingSchedule } from '@shared/api/models';

/** One id for the nightly retraining: upserting it again replaces it, so however many processes start there is one schedule. */
export const NIGHTLY_SCHEDULER_ID = 'nightly-training';

export const runJobId = (runId: number) => `run-${runId}`;

/** The producer side of the training queue, and the nightly job scheduler. */
export class TrainingQueue {
  readonly queue: Queue<TrainingJob>;

  constructor(c: Config, opts: { failFast?: boolean; name?: string } = {}) {
    this.queue = new Queue<TrainingJob>(QUEUES.training, {
      connection: createRedis(c, { forBullmq: true, failFast: opts.failFast ?? true, name: opts.name ?? 'training-producer' }),
      prefix: c.REDIS_PREFIX,
      // A training run is not retried on its own: a failed run says why, and "train now" starts another.
      defaultJobOptions: { attempts: 1, removeOnComplete: { count: 200 }, removeOnFail: { count: 200 } },
    });
  }

  async enqueueRun(runId: number): Promise<string> {
    const job = await this.queue.add('train', { runId }, { jobId: runJobId(runId) });
    return job.id ?? runJobId(runId);
  }

  /** Drops a run's job if it has not started (cancel before start); a started one stops through its run row. */
  async removeWaiting(runId: number): Promise<void> {
    const job = await this.queue.getJob(runJobId(runId));
    if (job && ((await job.isWaiting()) || (await job.isDelayed()))) await job.remove();
  }

  /** Registers (or replaces) the nightly scheduler from the saved schedule; a disabled schedule removes it. */
  async applySchedule(s: TrainingSchedule): Promise<void> {
    if (!s.enabled) {
      await this.queue.removeJobScheduler(NIGHTLY_SCHEDULER_ID);
      return;
    }
    await this.queue.upsertJobScheduler(
      NIGHTLY_SCHEDULER_ID,
      { pattern: s.cron, tz: s.timezone },
      { name: 'scheduled-training', data: { trigger: 'schedule' }, opts: { attempts: 1, removeOnComplete: { count: 50 }, removeOnFail: { count: 50 } } },
    );
  }

  async nextRunAt(): Promise<string | null> {
    const js = await this.queue.getJobScheduler(NIGHTLY_SCHEDULER_ID);
    return js?.next ? new Date(js.next).toISOString() : null;
  }

  close(): Promise<void> {
    return this.queue.close();
  }
}
