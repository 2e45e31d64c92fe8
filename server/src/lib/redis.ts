import { Redis, type RedisOptions } from 'ioredis';
import type { Config } from '../config/index';

/**
 * A Redis connection for this process. `forBullmq` connections must not cap
 * per-request retries (BullMQ's blocking commands rely on it).
 */
export function createRedis(c: Config, opts: { forBullmq?: boolean; name?: string } = {}): Redis {
  const options: RedisOptions = {
    host: c.REDIS_HOST,
    port: c.REDIS_PORT,
    connectionName: opts.name,
    enableOfflineQueue: opts.forBullmq ? true : false,
    maxRetriesPerRequest: opts.forBullmq ? null : 1,
    retryStrategy: (times) => Math.min(times * 200, 2_000),
    lazyConnect: false,
  };
  return new Redis(options);
}
