import { QueryTypes } from 'sequelize';
import type { Request } from 'express';
import type { Database } from '../db/database';
import type { Config } from '../config/index';
import type { MailQueue } from '../mail/mail-queue';
import type { SocketHub } from '../realtime/socket-hub';
import { AppError } from '../lib/app-error';
import { auditRequest } from '../audit/record-audit';
import { appendAudit } from '../audit/audit-repository';
import { hashPassword } from '../auth/password';
import { createUser, findUserByEmail, findUserById } from '../auth/user-repository';
import { INVITE_TTL_HOURS, type InviteInput } from '@shared/api/admin';
import { ROLE_LABELS, type Role } from '@shared/auth/roles';
import { consumeInvite, findOpenInvite, issueInvite } from './user-admin-repository';

export interface UserAdminDeps {
  db: Database;
  config: Config;
  mail: MailQueue;
  hub: SocketHub;
}

async function mustFind(db: Database, id: number) {
  const u = await findUserById(db, id);
  if (!u) throw AppError.notFound('No such person.');
  return u;
}

function notSelf(req: Request, id: number, what: string) {
  if (req.user!.id === id) throw AppError.conflict(`You cannot ${what} your own account: ask another admin.`, 'own_account');
}

/** Deletes a person's session rows and closes their sockets: whatever they had open ends now. */
async function endSessions(d: UserAdminDeps, userId: number, reason: 'deactivated' | 'signed_out'): Promise<number> {
  const ended = (await d.db.sequelize.query('DELETE FROM sessions WHERE user_id = ?', {
    replacements: [userId],
    type: QueryTypes.BULKDELETE,
  })) as unknown as number;
  d.hub.endUser(userId, reason);
  return ended;
}

async function mailInvite(d: UserAdminDeps, to: { id: number; email: string; displayName: string; role: Role }, token: string, expiresAt: Date, inviter: string) {
  const link = `${d.config.publicUrl}/accept-invite?token=${encodeURIComponent(token)}`;
  await d.mail.send({
    to: [to.email],
    subject: 'Your Edgecase account',
    text: [
      `Hello ${to.displayName},`,
      '',
      `${inviter} has given you an Edgecase account as ${ROLE_LABELS[to.role]}.`,
      'Choose your password here (the link works once, until ' + expiresAt.toISOString().replace('T', ' ').slice(0, 16) + ' UTC):',
      '',
      link,
      '',
      'If you did not expect this, ignore this message.',
    ].join('\n'),
    purpose: 'invite',
    related: { type: 'user', id: String(to.id) },
  });
}

/** Creates an account waiting for its owner and e-mails them a one-time link to set a password. */
export async function inviteUser(d: UserAdminDeps, req: Request, input: InviteInput & { email: string }) {
  if (await findUserByEmail(d.db, input.email)) throw AppError.badRequest('Someone has this e-mail address already.', [{ path: 'email', message: 'Taken' }]);
  const user = await createUser(d.db, { email: input.email, displayName: input.displayName, role: input.role, passwordHash: null, status: 'invited' });
  const { token, expiresAt } = await issueInvite(d.db, user.id, req.user!.id, INVITE_TTL_HOURS);
  await auditRequest(d.db, req, { action: 'user.invite', targetType: 'user', targetId: user.id, outcome: 'success', details: { email: user.email, role: user.role, expiresAt } });
  await mailInvite(d, user, token, expiresAt, req.user!.displayName);
  return user;
}

/** A fresh link for someone who has not accepted yet; the old one stops working. */
export async function resendInvite(d: UserAdminDeps, req: Request, id: number) {
  const user = await mustFind(d.db, id);
  if (user.status !== 'invited') throw AppError.conflict('This person has accepted their invitation already.', 'not_invited');
  const { token, expiresAt } = await issueInvite(d.db, user.id, req.user!.id, INVITE_TTL_HOURS);
  await auditRequest(d.db, req, { action: 'user.invite_resend', targetType: 'user', targetId: user.id, outcome: 'success', details: { expiresAt } });
  await mailInvite(d, user, token, expiresAt, req.user!.displayName);
}

export async function lookupInvite(d: Pick<UserAdminDeps, 'db'>, token: string) {
  const invite = await findOpenInvite(d.db, token);
  if (!invite) throw new AppError({ status: 410, code: 'invite_invalid', message: 'This link has been used or has expired. Ask an admin for a new one.' });
  return { email: invite.email, displayName: invite.displayName, role: invite.role, expiresAt: invite.expiresAt.toISOString() };
}

/** Sets the password of an invited account; the token works once (a conditional update decides a race). */
export async function acceptInvite(d: Pick<UserAdminDeps, 'db'>, req: Request, token: string, password: string) {
  const invite = await findOpenInvite(d.db, token);
  const invalid = () => new AppError({ status: 410, code: 'invite_invalid', message: 'This link has been used or has expired. Ask an admin for a new one.' });
  if (!invite) {
    await auditRequest(d.db, req, { action: 'user.accept_invite', targetType: 'user', outcome: 'failure', details: { reason: 'unknown, used or expired token' } });
    throw invalid();
  }
  const hash = await hashPassword(password);
  const ok = await d.db.sequelize.transaction(async (t) => {
    if (!(await consumeInvite(d.db, invite.id, t))) return false;
    await d.db.sequelize.query(
      "UPDATE users SET password_hash = ?, status = 'active', failed_login_count = 0, locked_until = NULL, updated_at = UTC_TIMESTAMP(3) WHERE id = ? AND status = 'invited'",
      { replacements: [hash, invite.userId], type: QueryTypes.UPDATE, transaction: t },
    );
    await appendAudit(
      d.db,
      { actorType: 'user', actorId: invite.userId, actorLabel: invite.email, action: 'user.accept_invite', targetType: 'user', targetId: invite.userId, outcome: 'success', ip: req.ip ?? null, userAgent: req.get('user-agent') ?? null },
      t,
    );
    return true;
  });
  if (!ok) throw invalid();
  return { email: invite.email };
}

export async function changeRole(d: UserAdminDeps, req: Request, id: number, role: Role) {
  notSelf(req, id, 'change the role of');
  const user = await mustFind(d.db, id);
  if (user.role === role) return;
  await d.db.sequelize.query('UPDATE users SET role = ?, updated_at = UTC_TIMESTAMP(3) WHERE id = ?', { replacements: [role, id], type: QueryTypes.UPDATE });
  // Their open screens and sockets were set up for the old role: they sign in again.
  const ended = await endSessions(d, id, 'signed_out');
  await auditRequest(d.db, req, { action: 'user.role', targetType: 'user', targetId: id, outcome: 'success', details: { from: user.role, to: role, sessionsEnded: ended } });
}

/** Deactivates an account and ends its sessions and sockets at once. */
export async function deactivateUser(d: UserAdminDeps, req: Request, id: number) {
  notSelf(req, id, 'deactivate');
  const user = await mustFind(d.db, id);
  if (user.status === 'deactivated') throw AppError.conflict('This account is deactivated already.', 'already_deactivated');
  await d.db.sequelize.query("UPDATE users SET status = 'deactivated', updated_at = UTC_TIMESTAMP(3) WHERE id = ?", { replacements: [id], type: QueryTypes.UPDATE });
  const ended = await endSessions(d, id, 'deactivated');
  const [{ n }] = await d.db.sequelize.query<{ n: number }>('SELECT COUNT(*) AS n FROM cases WHERE is_open = 1 AND assignee_id = ?', {
    replacements: [id],
    type: QueryTypes.SELECT,
  });
  await auditRequest(d.db, req, { action: 'user.deactivate', targetType: 'user', targetId: id, outcome: 'success', details: { sessionsEnded: ended, openCasesHeld: Number(n) } });
  return { openCasesHeld: Number(n) };
}

/** Lifts a sign-in lock-out before it runs out. */
export async function unlockUser(d: UserAdminDeps, req: Request, id: number) {
  const user = await mustFind(d.db, id);
  await d.db.sequelize.query('UPDATE users SET failed_login_count = 0, locked_until = NULL, updated_at = UTC_TIMESTAMP(3) WHERE id = ?', {
    replacements: [id],
    type: QueryTypes.UPDATE,
  });
  await auditRequest(d.db, req, { action: 'user.unlock', targetType: 'user', targetId: id, outcome: 'success', details: { wasLockedUntil: user.lockedUntil, failures: user.failedLoginCount } });
}
