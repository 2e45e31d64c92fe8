import { RateLimiterMemory, RateLimiterRedis, type RateLimiterAbstract } from 'rate-limiter-flexible';
import type { Redis } from 'ioredis';
import type { Config } from '../config/index';

const WINDOW_SECONDS = 15 * 60;

/**
 * Counts failed sign-ins per client address in Redis (shared by every server
 * process); an in-memory limiter stands in while Redis is unreachable so a
 * Redis outage neither opens the door nor locks everyone out.
 */
export class LoginLimiter {
  private readonly limiter: RateLimiterAbstract;

  constructor(redis: Redis, c: Config) {
    this.limiter = new RateLimiterRedis({
      storeClient: redis,
      keyPrefix: `${c.REDIS_PREFIX}:login-fail-ip`,
      points: c.LOGIN_MAX_FAILURES_PER_IP,
      duration: WINDOW_SECONDS,
      insuranceLimiter: new RateLimiterMemory({ points: c.LOGIN_MAX_FAILURES_PER_IP, duration: WINDOW_SECONDS }),
    });
  }

  /** Seconds until the address may try again, or 0 when it may try now. */
  async blockedFor(ip: string): Promise<number> {
    const res = await this.limiter.get(ip);
    if (res && res.remainingPoints <= 0) return Math.max(1, Math.ceil(res.msBeforeNext / 1000));
    return 0;
  }

  async recordFailure(ip: string): Promise<void> {
    await this.limiter.penalty(ip, 1);
  }

  async reset(ip: string): Promise<void> {
    await this.limiter.delete(ip);
  }
}
