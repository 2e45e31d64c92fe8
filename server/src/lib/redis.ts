import { Redis, type RedisOptions } from 'ioredis';
import type { Config } from '../config/index';

/**
 * A Redis connection for this process. `forBullmq` connections must not cap
 * per-request retries (BullMQ's blocking commands rely on it); `failFast`
 * turns off the offline queue, for producers on a request path.
 */
export function createRedis(c: Config, opts: { forBullmq?: boolean; name?: string; failFast?: boolean } = {}): Redis {
  const options: RedisOptions = {
    host: c.REDIS_HOST,
    port: c.REDIS_PORT,
    connectionName: opts.name,
    // Producers on request paths fail fast while Redis is down (so the API can answer 503); workers wait.
    enableOfflineQueue: opts.forBullmq && !opts.failFast ? true : false,
    maxRetriesPerRequest: opts.forBullmq ? null : 1,
    retryStrategy: (times) => Math.min(times * 200, 2_000),
    // A connection made while a restarted Redis replays its append-only file waits for "ready" (ioredis asks INFO
    // again after Redis's own loading estimate, up to 10 s by default); ask every half second instead, so a
    // restart costs the time Redis needs to load, not the estimate.
    maxLoadingRetryTime: 500,
    lazyConnect: false,
  };
  return new Redis(options);
}
