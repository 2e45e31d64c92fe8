import { createHash, randomBytes } from 'node:crypto';
import { QueryTypes, type Transaction } from 'sequelize';
import type { Database } from '../db/database';
import type { AdminUser } from '@shared/api/admin';
import type { Role } from '@shared/auth/roles';

interface UserRow {
  id: number;
  email: string;
  display_name: string;
  role: Role;
  status: AdminUser['status'];
  locked_until: Date | null;
  failed_login_count: number;
  last_login_at: Date | null;
  created_at: Date;
  invite_expires_at: Date | null;
}

const iso = (d: Date | null) => (d ? new Date(d).toISOString() : null);

export async function listUsers(db: Database): Promise<AdminUser[]> {
  const rows = await db.sequelize.query<UserRow>(
    `SELECT u.id, u.email, u.display_name, u.role, u.status, u.locked_until, u.failed_login_count, u.last_login_at, u.created_at,
            (SELECT MAX(i.expires_at) FROM user_invites i WHERE i.user_id = u.id AND i.used_at IS NULL) AS invite_expires_at
     FROM users u ORDER BY u.display_name`,
    { type: QueryTypes.SELECT },
  );
  const now = Date.now();
  return rows.map((r) => ({
    id: Number(r.id),
    email: r.email,
    displayName: r.display_name,
    role: r.role,
    status: r.status,
    lockedUntil: r.locked_until && new Date(r.locked_until).getTime() > now ? iso(r.locked_until) : null,
    failedLoginCount: Number(r.failed_login_count),
    lastLoginAt: iso(r.last_login_at),
    createdAt: iso(r.created_at)!,
    inviteExpiresAt: r.status === 'invited' ? iso(r.invite_expires_at) : null,
  }));
}

export const hashInviteToken = (token: string) => createHash('sha256').update(token, 'utf8').digest('hex');

/** A new one-time token for a person; only its hash is stored. Older unused tokens of the person stop working. */
export async function issueInvite(db: Database, userId: number, createdBy: number, ttlHours: number, t?: Transaction): Promise<{ token: string; expiresAt: Date }> {
  const token = randomBytes(32).toString('base64url');
  const expiresAt = new Date(Date.now() + ttlHours * 3_600_000);
  await db.sequelize.query('UPDATE user_invites SET used_at = UTC_TIMESTAMP(3) WHERE user_id = ? AND used_at IS NULL', {
    replacements: [userId],
    type: QueryTypes.UPDATE,
    transaction: t,
  });
  await db.sequelize.query('INSERT INTO user_invites (user_id, token_hash, expires_at, created_by, created_at) VALUES (?, ?, ?, ?, UTC_TIMESTAMP(3))', {
    replacements: [userId, hashInviteToken(token), expiresAt, createdBy],
    type: QueryTypes.INSERT,
    transaction: t,
  });
  return { token, expiresAt };
}

export interface InviteRecord {
  id: number;
  userId: number;
  email: string;
  displayName: string;
  role: Role;
  expiresAt: Date;
}

/** The invitation a token opens, if it is unused, unexpired and its account still waits for it. */
export async function findOpenInvite(db: Database, token: string): Promise<InviteRecord | null> {
  const [r] = await db.sequelize.query<{ id: number; user_id: number; email: string; display_name: string; role: Role; expires_at: Date }>(
    `SELECT i.id, i.user_id, u.email, u.display_name, u.role, i.expires_at
     FROM user_invites i JOIN users u ON u.id = i.user_id
     WHERE i.token_hash = ? AND i.used_at IS NULL AND i.expires_at > UTC_TIMESTAMP(3) AND u.status = 'invited'`,
    { replacements: [hashInviteToken(token)], type: QueryTypes.SELECT },
  );
  return r ? { id: Number(r.id), userId: Number(r.user_id), email: r.email, displayName: r.display_name, role: r.role, expiresAt: new Date(r.expires_at) } : null;
}

/** Marks the invitation used in one conditional statement: of two uses racing, one wins. */
export async function consumeInvite(db: Database, inviteId: number, t: Transaction): Promise<boolean> {
  const [, affected] = (await db.sequelize.query(
    'UPDATE user_invites SET used_at = UTC_TIMESTAMP(3) WHERE id = ? AND used_at IS NULL AND expires_at > UTC_TIMESTAMP(3)',
    { replacements: [inviteId], type: QueryTypes.UPDATE, transaction: t },
  )) as unknown as [unknown, number];
  return affected === 1;
}
