import { createHash } from 'node:crypto';
import { RateLimiterMemory, RateLimiterRedis, type RateLimiterAbstract } from 'rate-limiter-flexible';
import type { Redis } from 'ioredis';
import type { Config } from '../config/index';
import type { UnknownAccountLocks } from './sign-in';

const WINDOW_SECONDS = 15 * 60;

/**
 * Counts failed sign-ins in Redis (shared by every server process): per
 * client address, and per e-mail that has no usable account (so those lock
 * out exactly as real accounts do, whose count lives on the user row). An
 * in-memory limiter stands in while Redis is unreachable so a Redis outage
 * neither opens the door nor locks everyone out.
 */
export class LoginLimiter implements UnknownAccountLocks {
  private readonly limiter: RateLimiterAbstract;
  private readonly unknownAccounts: RateLimiterAbstract;
  private readonly maxAccountFailures: number;
  private readonly lockSeconds: number;

  constructor(redis: Redis, c: Config) {
    this.limiter = new RateLimiterRedis({
      storeClient: redis,
      keyPrefix: `${c.REDIS_PREFIX}:login-fail-ip`,
      points: c.LOGIN_MAX_FAILURES_PER_IP,
      duration: WINDOW_SECONDS,
      insuranceLimiter: new RateLimiterMemory({ points: c.LOGIN_MAX_FAILURES_PER_IP, duration: WINDOW_SECONDS }),
    });
    this.maxAccountFailures = c.LOGIN_MAX_FAILURES_PER_ACCOUNT;
    this.lockSeconds = c.LOGIN_LOCKOUT_MINUTES * 60;
    // Like a user row's failure count, the count never expires on its own; the lock-out does (duration 0: kept until blocked).
    this.unknownAccounts = new RateLimiterRedis({
      storeClient: redis,
      keyPrefix: `${c.REDIS_PREFIX}:login-fail-account`,
      points: this.maxAccountFailures,
      duration: 0,
      insuranceLimiter: new RateLimiterMemory({ points: this.maxAccountFailures, duration: 0 }),
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

  async accountLockedFor(email: string): Promise<number> {
    const res = await this.unknownAccounts.get(accountKey(email));
    if (res && res.consumedPoints > this.maxAccountFailures) return Math.max(1, Math.ceil(res.msBeforeNext / 1000));
    return 0;
  }

  async recordAccountFailure(email: string): Promise<number> {
    const key = accountKey(email);
    const res = await this.unknownAccounts.penalty(key, 1);
    if (res.consumedPoints < this.maxAccountFailures) return 0;
    await this.unknownAccounts.block(key, this.lockSeconds);
    return this.lockSeconds;
  }
}

/** The e-mail as typed is not kept in Redis, only its digest. */
function accountKey(email: string): string {
  return createHash('sha256').update(email.trim().toLowerCase()).digest('hex');
}
