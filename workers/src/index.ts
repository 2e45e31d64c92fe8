import type { Worker, Queue } from 'bullmq';
import { loadConfig } from '../../server/src/config/index';
import { openDatabase } from '../../server/src/db/database';
import { logger } from '../../server/src/lib/logger';
import { createMailWorker } from './mail.worker';
import { createMaintenanceWorker } from './maintenance.worker';
import { createScoringWorker } from './scoring.worker';
import { createOutgoingWorker } from './outgoing.worker';
import { createTrainingWorker } from './training.worker';
import { createDriftWorker } from './drift.worker';

process.env.EDGECASE_PROCESS ??= 'workers';

/**
 * Entry point of the worker process. `--only mail,maintenance` runs a subset
 * (so scoring and training can run in processes of their own).
 */
async function main() {
  const c = loadConfig();
  const onlyArg = process.argv.find((a) => a.startsWith('--only='))?.slice('--only='.length);
  const only = onlyArg ? new Set(onlyArg.split(',')) : null;
  const wants = (name: string) => only === null || only.has(name);
  const db = openDatabase(c);
  await db.ping();

  const workers: Worker[] = [];
  const queues: Queue[] = [];
  if (wants('mail')) workers.push(createMailWorker(c, db) as unknown as Worker);
  if (wants('outgoing')) workers.push(createOutgoingWorker(c, db) as unknown as Worker);
  if (wants('maintenance')) {
    const m = await createMaintenanceWorker(c, db);
    workers.push(m.worker as unknown as Worker);
    queues.push(m.queue as unknown as Queue, m.scoring as unknown as Queue);
  }
  const closers: (() => Promise<void>)[] = [];
  if (wants('scoring')) {
    const s = await createScoringWorker(c, db, Number(process.env.SCORING_CONCURRENCY ?? 4));
    workers.push(s.worker as unknown as Worker);
    closers.push(s.close);
  }
  // Training boosts in a worker thread; `--only=training` gives it a process of its own so scoring never waits on it.
  for (const [name, create] of [
    ['training', () => createTrainingWorker(c, db)],
    ['drift', () => createDriftWorker(c, db)],
  ] as const) {
    if (!wants(name)) continue;
    const w = await create();
    workers.push(w.worker as unknown as Worker);
    closers.push(w.close);
  }
  for (const w of workers) {
    w.on('failed', (job, err) => logger().warn({ queue: w.name, jobId: job?.id, err: err.message }, 'job failed'));
    w.on('error', (err) => logger().error({ queue: w.name, err: err.message }, 'worker error'));
  }
  logger().info({ workers: workers.map((w) => w.name) }, 'workers running');

  let closing: Promise<void> | undefined;
  const close = (signal: string) => {
    closing ??= (async () => {
      logger().info({ signal }, 'workers stopping');
      const force = setTimeout(() => process.exit(1), 15_000);
      force.unref();
      await Promise.allSettled(workers.map((w) => w.close()));
      await Promise.allSettled(queues.map((q) => q.close()));
      await Promise.allSettled(closers.map((f) => f()));
      await db.close().catch(() => undefined);
      process.exit(0);
    })();
    return closing;
  };
  process.on('SIGTERM', () => void close('SIGTERM'));
  process.on('SIGINT', () => void close('SIGINT'));
}

process.on('unhandledRejection', (reason) => logger().error({ err: reason }, 'unhandled promise rejection'));

main().catch((err) => {
  logger().fatal({ err }, 'workers failed to start');
  process.exit(1);
});
