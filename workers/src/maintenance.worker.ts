import { Queue, UnrecoverableError, Worker, type Job } from 'bullmq';
import { Op } from 'sequelize';
import type { Config } from '../../server/src/config/index';
import type { Database } from '../../server/src/db/database';
import { createRedis } from '../../server/src/lib/redis';
import { QUEUES, maintenanceJobSchema, type MaintenanceJob } from '@shared/jobs/queues';
import { workerOptions } from './lib/worker-options';

/**
 * Housekeeping on a schedule: removes expired staff sessions. The schedule is
 * a BullMQ job scheduler, so however many worker processes start there is one.
 */
export async function createMaintenanceWorker(c: Config, db: Database): Promise<{ worker: Worker<MaintenanceJob>; queue: Queue<MaintenanceJob> }> {
  const queue = new Queue<MaintenanceJob>(QUEUES.maintenance, {
    connection: createRedis(c, { forBullmq: true, name: 'maintenance-scheduler' }),
    prefix: c.REDIS_PREFIX,
  });
  await queue.upsertJobScheduler(
    'purge-expired-sessions',
    { every: 5 * 60_000 },
    { name: 'purge-expired-sessions', data: { task: 'purge-expired-sessions' }, opts: { removeOnComplete: 100, removeOnFail: 100 } },
  );
  const worker = new Worker<MaintenanceJob, { removed: number }>(
    QUEUES.maintenance,
    async (job: Job<MaintenanceJob>) => {
      const parsed = maintenanceJobSchema.safeParse(job.data);
      if (!parsed.success) throw new UnrecoverableError('invalid maintenance job');
      const removed = await db.models.Session.destroy({ where: { expires: { [Op.lt]: new Date() } } });
      return { removed };
    },
    workerOptions(c, 'maintenance'),
  );
  return { worker, queue };
}
