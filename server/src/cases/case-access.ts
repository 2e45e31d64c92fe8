import type { Request } from 'express';
import { QueryTypes } from 'sequelize';
import { can } from '@shared/auth/roles';
import type { Database } from '../db/database';
import { AppError } from '../lib/app-error';
import { auditRequest } from '../audit/record-audit';

/**
 * Who may see a case, and so open it, act on it, and read or add its evidence.
 * Teams are the investigator groups routing hands cases to.
 *
 * - A role with `case:any-team` (supervisors) sees every case.
 * - Anyone else who works the queue sees a case that has no team (the shared
 *   queue), a case routed to a team they belong to, or a case assigned to
 *   them (a supervisor may hand a case across teams; releasing it sends it
 *   back to its team).
 *
 * The rule is written once, as an SQL condition over `cases c`: the queue and
 * its counts filter with it, and every single-case read and action adds it to
 * the case's own lookup, so the list and the case file cannot disagree.
 * `caseAudience` states the same rule as recipients, for live events.
 *
 * A case the caller may not see answers 404 with the same body as a case that
 * does not exist, not 403: a guessed id tells nothing about other teams' cases
 * (RFC 9110 §15.5.4 lets a server answer 404 to hide that a resource exists;
 * OWASP ASVS 4.0.3 V4.2.1 asks that records be protected against direct
 * object references). The refusal is audited with outcome 'denied' (ASVS
 * V7.2.2: failed access control decisions are logged).
 */
export interface CaseViewer {
  userId: number;
  anyTeam: boolean;
  teamIds: number[];
}

/** The teams (investigator groups) each of these people belongs to. */
export async function teamsOf(db: Database, userIds: number[]): Promise<Map<number, number[]>> {
  const out = new Map<number, number[]>(userIds.map((id) => [id, []]));
  if (userIds.length === 0) return out;
  const rows = await db.sequelize.query<{ user_id: number; group_id: number }>(
    'SELECT user_id, group_id FROM investigator_group_members WHERE user_id IN (:userIds) ORDER BY group_id',
    { replacements: { userIds }, type: QueryTypes.SELECT },
  );
  for (const r of rows) out.get(Number(r.user_id))?.push(Number(r.group_id));
  return out;
}

const viewers = new WeakMap<Request, Promise<CaseViewer>>();

/** The signed-in caller as a case viewer (team memberships read once per request). */
export function caseViewer(db: Database, req: Request): Promise<CaseViewer> {
  let v = viewers.get(req);
  if (!v) {
    const user = req.user!;
    v = can(user.role, 'case:any-team')
      ? Promise.resolve({ userId: user.id, anyTeam: true, teamIds: [] })
      : teamsOf(db, [user.id]).then((teams) => ({ userId: user.id, anyTeam: false, teamIds: teams.get(user.id) ?? [] }));
    viewers.set(req, v);
  }
  return v;
}

/**
 * The rule as a condition over `cases c`, with named replacements. Each part
 * tests a column the queue's indexes carry (team_id, assignee_id), so a count
 * reads `(is_open, team_id, assignee_id)` alone.
 */
export function visibleCaseSql(v: CaseViewer): { sql: string; replacements: Record<string, unknown> } {
  if (v.anyTeam) return { sql: '1 = 1', replacements: {} };
  const teams = v.teamIds.length > 0 ? ' OR c.team_id IN (:viewerTeams)' : '';
  return { sql: `(c.team_id IS NULL${teams} OR c.assignee_id = :viewerId)`, replacements: { viewerId: v.userId, viewerTeams: v.teamIds } };
}

/** The same rule read the other way: who may see a case, for pushing its events. */
export function caseAudience(c: { teamId: number | null; assigneeId: number | null }): { everyone: boolean; teamId: number | null; userIds: number[] } {
  return { everyone: c.teamId === null, teamId: c.teamId, userIds: c.assigneeId === null ? [] : [c.assigneeId] };
}

/**
 * Refuses a case the caller may not see: 404 like a missing case, audited as
 * denied under `action` when the case exists.
 */
export async function requireVisibleCase(db: Database, req: Request, caseId: number, action: string, details: Record<string, unknown> = {}): Promise<void> {
  const cond = visibleCaseSql(await caseViewer(db, req));
  const [row] = await db.sequelize.query<{ id: number; visible: number }>(`SELECT c.id, ${cond.sql} AS visible FROM cases c WHERE c.id = :caseId`, {
    replacements: { ...cond.replacements, caseId },
    type: QueryTypes.SELECT,
  });
  if (row && Number(row.visible) === 1) return;
  if (row) await auditRequest(db, req, { action, targetType: 'case', targetId: caseId, outcome: 'denied', details: { reason: 'not_visible', ...details } });
  throw AppError.notFound('No such case.');
}
