import { UnrecoverableError, Worker, type Job } from 'bullmq';
import type { Redis } from 'ioredis';
import type { Config } from '../../server/src/config/index';
import type { Database } from '../../server/src/db/database';
import { createRedis } from '../../server/src/lib/redis';
import { MailQueue } from '../../server/src/mail/mail-queue';
import { DriftQueue } from '../../server/src/drift/drift-queue';
import { computeDriftReport } from '../../server/src/drift/compute-drift-report';
import { QUEUES, driftJobSchema, type DriftJob } from '@shared/jobs/queues';
import { workerOptions } from './lib/worker-options';

/**
 * The daily drift report of the champion (and "compute now" from the Models
 * screen). Registers its daily job scheduler on start; the fixed scheduler id
 * keeps it to one however many processes start.
 */
export async function createDriftWorker(c: Config, db: Database): Promise<{ worker: Worker<DriftJob>; close(): Promise<void> }> {
  const redis: Redis = createRedis(c, { name: 'drift-events' });
  const mail = new MailQueue(c);
  const scheduler = new DriftQueue(c, { failFast: false, name: 'drift-scheduler' });
  await scheduler.applyDailySchedule();
  const worker = new Worker<DriftJob, { reportId: number | null; flagged: string[]; skipped?: string }>(
    QUEUES.drift,
    async (job: Job<DriftJob>) => {
      const parsed = driftJobSchema.safeParse(job.data);
      if (!parsed.success) throw new UnrecoverableError(`invalid drift job: ${parsed.error.issues[0]?.message ?? 'bad payload'}`);
      const outcome = await computeDriftReport({ db, redis, config: c, mail });
      return 'report' in outcome ? { reportId: outcome.report.id, flagged: outcome.report.flagged } : { reportId: null, flagged: [], skipped: outcome.skipped };
    },
    workerOptions(c, 'drift'),
  );
  return {
    worker,
    async close() {
      await worker.close();
      await scheduler.close();
      await mail.close();
      redis.disconnect();
    },
  };
}
