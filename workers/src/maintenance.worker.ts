import { Queue, UnrecoverableError, Worker, type Job } from 'bullmq';
import { Op, QueryTypes } from 'sequelize';
import type { Config } from '../../server/src/config/index';
import type { Database } from '../../server/src/db/database';
import { createRedis } from '../../server/src/lib/redis';
import { QUEUES, maintenanceJobSchema, type MaintenanceJob, type ScoringJob } from '@shared/jobs/queues';
import { workerOptions } from './lib/worker-options';

/** Accepted transactions older than this and still unscored are queued again. */
const REQUEUE_AFTER_SECONDS = 60;

/**
 * Housekeeping on a schedule: removes expired staff sessions, and queues again
 * accepted transactions that never reached the scoring queue (stored, then
 * Redis went away before the job was added). Scoring is idempotent, so a
 * transaction queued twice is still scored once. The schedules are BullMQ job
 * schedulers, so however many worker processes start there is one of each.
 */
export async function createMaintenanceWorker(c: Config, db: Database): Promise<{ worker: Worker<MaintenanceJob>; queue: Queue<MaintenanceJob>; scoring: Queue<ScoringJob> }> {
  const queue = new Queue<MaintenanceJob>(QUEUES.maintenance, {
    connection: createRedis(c, { forBullmq: true, name: 'maintenance-scheduler' }),
    prefix: c.REDIS_PREFIX,
  });
  await queue.upsertJobScheduler(
    'purge-expired-sessions',
    { every: 5 * 60_000 },
    { name: 'purge-expired-sessions', data: { task: 'purge-expired-sessions' }, opts: { removeOnComplete: 100, removeOnFail: 100 } },
  );
  await queue.upsertJobScheduler(
    'requeue-unscored',
    { every: 30_000 },
    { name: 'requeue-unscored', data: { task: 'requeue-unscored' }, opts: { removeOnComplete: 100, removeOnFail: 100 } },
  );
  const scoring = new Queue<ScoringJob>(QUEUES.scoring, {
    connection: createRedis(c, { forBullmq: true, name: 'maintenance-requeue' }),
    prefix: c.REDIS_PREFIX,
  });
  const worker = new Worker<MaintenanceJob, { removed?: number; requeued?: number }>(
    QUEUES.maintenance,
    async (job: Job<MaintenanceJob>) => {
      const parsed = maintenanceJobSchema.safeParse(job.data);
      if (!parsed.success) throw new UnrecoverableError('invalid maintenance job');
      if (parsed.data.task === 'purge-expired-sessions') {
        const removed = await db.models.Session.destroy({ where: { expires: { [Op.lt]: new Date() } } });
        return { removed };
      }
      const champion = await db.sequelize.query("SELECT id FROM model_versions WHERE role = 'champion' LIMIT 1", { type: QueryTypes.SELECT });
      if (champion.length === 0) return { requeued: 0 };
      const rows = await db.sequelize.query<{ id: number }>(
        "SELECT id FROM transactions WHERE status = 'accepted' AND received_at < DATE_SUB(UTC_TIMESTAMP(3), INTERVAL ? SECOND) ORDER BY id LIMIT 10000",
        { replacements: [REQUEUE_AFTER_SECONDS], type: QueryTypes.SELECT },
      );
      const ids = rows.map((r) => Number(r.id));
      for (let i = 0; i < ids.length; i += 1000) {
        const chunk = ids.slice(i, i + 1000);
        await scoring.add('score', { transactionIds: chunk, batch: `requeue-${chunk[0]}-${chunk[chunk.length - 1]}` }, {
          jobId: `requeue-${chunk[0]}-${chunk[chunk.length - 1]}-${Math.floor(Date.now() / 60_000)}`,
          attempts: 20,
          backoff: { type: 'exponential', delay: 500 },
          removeOnComplete: { age: 3_600 },
        });
      }
      return { requeued: ids.length };
    },
    workerOptions(c, 'maintenance'),
  );
  return { worker, queue, scoring };
}
