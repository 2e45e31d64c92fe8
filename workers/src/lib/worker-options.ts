import type { WorkerOptions } from 'bullmq';
import type { Config } from '../../../server/src/config/index';
import { createRedis } from '../../../server/src/lib/redis';

/**
 * Options every Edgecase worker shares.
 * - `prefix`: the deployment's Redis prefix, so two copies can share a Redis.
 * - `concurrency`: jobs processed at once by this worker (default 1).
 */
export function workerOptions(c: Config, name: string, concurrency = 1): WorkerOptions {
  return {
    connection: createRedis(c, { forBullmq: true, name: `worker-${name}` }),
    prefix: c.REDIS_PREFIX,
    concurrency,
    autorun: true,
  };
}
