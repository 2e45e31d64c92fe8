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
 * The sign-in story: find the account, refuse while it is locked, check the
 * password, count failures toward a lock-out, and audit every outcome. The
 * answer never says whether the email exists.
 */
export async function signIn(db: Database, c: Config, email: string, password: string, ctx: SignInContext): Promise<SignInResult> {
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
    await verifyPassword(await dummyPasswordHash(), password);
    await audit('failure', user, { reason: user ? `account ${user.status}` : 'unknown account' });
    return { ok: false, reason: 'invalid_credentials' };
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
