import type { Database } from '../db/database';
import type { Config } from '../config/index';
import { appendAudit } from '../audit/audit-repository';
import { dummyPasswordHash, verifyPassword } from './password';
import {
  clearExpiredLock,
  findUserByEmail,
  recordFailedSignIn,
  recordSuccessfulSignIn,
  toSessionUser,
  type UserRecord,
} from './user-repository';
import type { SessionUser } from '@shared/api/auth';

export type SignInResult =
  | { ok: true; user: SessionUser }
  | { ok: false; reason: 'invalid_credentials' }
  | { ok: false; reason: 'account_locked'; retryAfterSeconds: number };

export interface SignInContext {
  ip: string | null;
  userAgent: string | null;
}

/**
 * Failure counts and lock-outs for e-mails without a usable account (none,
 * invited, deactivated), kept outside the user table. They lock out after the
 * same number of failures and for the same time as a real account, so the
 * answers never tell an attacker which e-mails have one.
 */
export interface UnknownAccountLocks {
  /** Seconds the e-mail stays locked, 0 when it is not. */
  accountLockedFor(email: string): Promise<number>;
  /** Counts a failure; seconds of the lock-out it started, 0 when none. */
  recordAccountFailure(email: string): Promise<number>;
}

/**
 * The sign-in story: find the account, refuse while it is locked, check the
 * password, count failures toward a lock-out, and audit every outcome. The
 * answer never says whether the email exists: an e-mail without a usable
 * account is refused, counted and locked out like one with an account.
 */
export async function signIn(
  db: Database,
  c: Config,
  email: string,
  password: string,
  ctx: SignInContext,
  unknownAccounts: UnknownAccountLocks,
): Promise<SignInResult> {
  const user = await findUserByEmail(db, email);
  const audit = (outcome: 'success' | 'failure' | 'denied', u: UserRecord | null, details: Record<string, unknown>) =>
    appendAudit(db, {
      actorType: u ? 'user' : 'anonymous',
      actorId: u?.id ?? null,
      actorLabel: email,
      action: 'auth.sign_in',
      targetType: 'user',
      targetId: u?.id ?? null,
      outcome,
      ip: ctx.ip,
      userAgent: ctx.userAgent,
      details,
    });

  if (!user || user.status !== 'active' || !user.passwordHash) {
    const reason = user ? `account ${user.status}` : 'unknown account';
    const lockedFor = await unknownAccounts.accountLockedFor(email);
    if (lockedFor > 0) {
      await audit('denied', user, { reason: 'locked out', account: reason, retryAfterSeconds: lockedFor });
      return { ok: false, reason: 'account_locked', retryAfterSeconds: lockedFor };
    }
    await verifyPassword(await dummyPasswordHash(), password);
    const lockedNow = await unknownAccounts.recordAccountFailure(email);
    await audit('failure', user, { reason, lockedOut: lockedNow > 0 });
    return lockedNow > 0 ? { ok: false, reason: 'account_locked', retryAfterSeconds: lockedNow } : { ok: false, reason: 'invalid_credentials' };
  }

  const now = Date.now();
  if (user.lockedUntil && user.lockedUntil.getTime() > now) {
    const retryAfterSeconds = Math.ceil((user.lockedUntil.getTime() - now) / 1000);
    await audit('denied', user, { reason: 'locked out', retryAfterSeconds });
    return { ok: false, reason: 'account_locked', retryAfterSeconds };
  }
  if (user.lockedUntil) await clearExpiredLock(db, user.id);

  if (!(await verifyPassword(user.passwordHash, password))) {
    const { locked, lockedUntil } = await recordFailedSignIn(db, user.id, c.LOGIN_MAX_FAILURES_PER_ACCOUNT, c.LOGIN_LOCKOUT_MINUTES);
    await audit('failure', user, { reason: 'wrong password', lockedOut: locked });
    if (locked && lockedUntil) {
      return { ok: false, reason: 'account_locked', retryAfterSeconds: Math.ceil((lockedUntil.getTime() - Date.now()) / 1000) };
    }
    return { ok: false, reason: 'invalid_credentials' };
  }

  await recordSuccessfulSignIn(db, user.id);
  await audit('success', user, {});
  return { ok: true, user: toSessionUser(user) };
}
