import { QueryTypes } from 'sequelize';
import type { Database } from '../db/database';
import type { UserModel } from '../db/models/index';
import type { SessionUser } from '@shared/api/auth';
import type { Role } from '@shared/auth/roles';

export interface UserRecord extends SessionUser {
  status: 'active' | 'invited' | 'deactivated';
  passwordHash: string | null;
  failedLoginCount: number;
  lockedUntil: Date | null;
  lastLoginAt: Date | null;
}

function toRecord(u: UserModel): UserRecord {
  return {
    id: u.id,
    email: u.email,
    displayName: u.displayName,
    role: u.role,
    status: u.status,
    passwordHash: u.passwordHash,
    failedLoginCount: u.failedLoginCount,
    lockedUntil: u.lockedUntil,
    lastLoginAt: u.lastLoginAt,
  };
}

export function toSessionUser(u: UserRecord): SessionUser {
  return { id: u.id, email: u.email, displayName: u.displayName, role: u.role };
}

export async function findUserByEmail(db: Database, email: string): Promise<UserRecord | null> {
  const u = await db.models.User.findOne({ where: { email: email.toLowerCase() } });
  return u ? toRecord(u) : null;
}

export async function findUserById(db: Database, id: number): Promise<UserRecord | null> {
  const u = await db.models.User.findByPk(id);
  return u ? toRecord(u) : null;
}

export async function recordFailedSignIn(db: Database, id: number, maxFailures: number, lockMinutes: number): Promise<{ locked: boolean; lockedUntil: Date | null }> {
  // One statement, so two parallel failures cannot both read the old count.
  await db.sequelize.query(
    `UPDATE users SET failed_login_count = failed_login_count + 1,
       locked_until = IF(failed_login_count >= ?, DATE_ADD(UTC_TIMESTAMP(3), INTERVAL ? MINUTE), locked_until),
       updated_at = UTC_TIMESTAMP(3)
     WHERE id = ?`,
    { replacements: [maxFailures, lockMinutes, id], type: QueryTypes.UPDATE },
  );
  const u = await findUserById(db, id);
  const lockedUntil = u?.lockedUntil ?? null;
  return { locked: lockedUntil !== null && lockedUntil.getTime() > Date.now(), lockedUntil };
}

export async function recordSuccessfulSignIn(db: Database, id: number): Promise<void> {
  await db.models.User.update({ failedLoginCount: 0, lockedUntil: null, lastLoginAt: new Date() }, { where: { id } });
}

export async function createUser(
  db: Database,
  input: { email: string; displayName: string; role: Role; passwordHash: string | null; status?: 'active' | 'invited' },
): Promise<UserRecord> {
  const u = await db.models.User.create({
    email: input.email.toLowerCase(),
    displayName: input.displayName,
    role: input.role,
    passwordHash: input.passwordHash,
    status: input.status ?? 'active',
    lockedUntil: null,
    lastLoginAt: null,
  });
  return toRecord(u);
}

/** Clears an expired lock-out so the next failure starts a fresh count. */
export async function clearExpiredLock(db: Database, id: number): Promise<void> {
  await db.models.User.update({ failedLoginCount: 0, lockedUntil: null }, { where: { id } });
}
