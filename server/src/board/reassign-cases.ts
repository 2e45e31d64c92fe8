import { QueryTypes } from 'sequelize';
import type { Request } from 'express';
import type { Redis } from 'ioredis';
import type { z } from 'zod';
import type { Database } from '../db/database';
import type { Config } from '../config/index';
import type { MailQueue } from '../mail/mail-queue';
import { AppError } from '../lib/app-error';
import { logger } from '../lib/logger';
import { appendAudit } from '../audit/audit-repository';
import { actorFromRequest } from '../audit/record-audit';
import { publishEvents, type DomainEvent } from '../events/event-bus';
import { CASE_COLUMNS, CASE_FROM, toSummary, type CaseRow } from '../cases/case-queries';
import { CASE_STATUS_LABELS, PRIORITIES } from '@shared/api/cases';
import type { ReassignResponse, reassignSchema } from '@shared/api/supervision';

export interface BoardDeps {
  db: Database;
  redis: Redis;
  config: Config;
  mail: MailQueue;
}

/** Statuses a case can be handed on in: closed ones are done, and one awaiting approval belongs to its approver now. */
const REASSIGNABLE = new Set(['new', 'claimed', 'waiting_cardholder', 'escalated']);

function money(minor: number, currency: string, exponent: number) {
  return `${currency} ${(minor / 10 ** exponent).toLocaleString('en', { minimumFractionDigits: exponent, maximumFractionDigits: exponent })}`;
}

/**
 * Hands one or many open cases to one person, all or nothing: the cases are
 * locked, checked and updated in one transaction (with one audit row each);
 * any case that cannot move refuses the whole request. Afterwards both the old
 * and the new holder's screens hear of it (`case.changed` with
 * `previousAssigneeId`), and the new holder gets an e-mail.
 */
export async function reassignCases(d: BoardDeps, req: Request, input: z.output<typeof reassignSchema>): Promise<ReassignResponse> {
  const [target] = await d.db.sequelize.query<{ id: number; email: string; display_name: string; role: string; status: string }>(
    'SELECT id, email, display_name, role, status FROM users WHERE id = ?',
    { replacements: [input.assigneeId], type: QueryTypes.SELECT },
  );
  if (!target || target.status !== 'active' || !['investigator', 'supervisor'].includes(target.role)) {
    throw AppError.badRequest('Cases can go only to an active investigator or supervisor.', [{ path: 'assigneeId', message: 'Not assignable' }]);
  }
  const to = Number(target.id);
  const ids = input.caseIds;

  const before = await d.db.sequelize.transaction(async (t) => {
    const rows = await d.db.sequelize.query<CaseRow>(`SELECT ${CASE_COLUMNS} ${CASE_FROM} WHERE c.id IN (:ids) ORDER BY c.id FOR UPDATE`, {
      replacements: { ids },
      type: QueryTypes.SELECT,
      transaction: t,
    });
    const found = new Map(rows.map((r) => [Number(r.id), r]));
    const refused = ids.flatMap((id) => {
      const r = found.get(id);
      if (!r) return [{ id, reason: 'no such case' }];
      if (!REASSIGNABLE.has(r.status)) return [{ id, reason: CASE_STATUS_LABELS[r.status].toLowerCase() }];
      return [];
    });
    if (refused.length > 0) {
      throw new AppError({
        status: 409,
        code: 'reassign_refused',
        message: `Nothing was reassigned: ${refused.map((r) => `#${r.id} (${r.reason})`).join(', ')}.`,
        extra: { refused },
      });
    }
    // One statement for every case; claimed_at restarts for whoever is new to the case.
    await d.db.sequelize.query(
      `UPDATE cases SET claimed_at = IF(assignee_id <=> :to, claimed_at, UTC_TIMESTAMP(3)), assignee_id = :to,
              version = version + 1, updated_at = UTC_TIMESTAMP(3)
       WHERE id IN (:ids)`,
      { replacements: { to, ids }, type: QueryTypes.UPDATE, transaction: t },
    );
    for (const r of rows) {
      await appendAudit(
        d.db,
        {
          ...actorFromRequest(req),
          action: 'case.reassign',
          targetType: 'case',
          targetId: Number(r.id),
          outcome: 'success',
          details: { from: r.assignee_id === null ? null : Number(r.assignee_id), to, batch: ids.length, note: input.note ?? null },
        },
        t,
      );
    }
    return rows;
  });

  const now = new Date().toISOString();
  const events: DomainEvent[] = before.map((r) => ({
    type: 'case.changed',
    caseId: Number(r.id),
    status: r.status,
    assigneeId: to,
    previousAssigneeId: r.assignee_id === null ? null : Number(r.assignee_id),
    teamId: r.team_id === null ? null : Number(r.team_id),
    at: now,
  }));
  await publishEvents(d.redis, d.config.REDIS_PREFIX, events).catch(() => undefined);

  const after = await d.db.sequelize.query<CaseRow>(`SELECT ${CASE_COLUMNS} ${CASE_FROM} WHERE c.id IN (:ids) ORDER BY c.id`, {
    replacements: { ids },
    type: QueryTypes.SELECT,
  });
  if (to !== req.user!.id) {
    const byUrgency = [...after].sort((a, b) => PRIORITIES.indexOf(a.priority) - PRIORITIES.indexOf(b.priority) || +new Date(a.sla_due_at) - +new Date(b.sla_due_at));
    // No card data in mail: the case number is enough to find it.
    const lines = byUrgency.map(
      (c) => `  #${c.id}  ${c.priority}, ${money(Number(c.amount_at_risk_minor), c.currency, Number(c.currency_exponent))} at risk, SLA due ${new Date(c.sla_due_at).toISOString().replace('T', ' ').slice(0, 16)} UTC`,
    );
    const count = after.length === 1 ? 'a case' : `${after.length} cases`;
    await d.mail
      .send({
        to: [target.email],
        subject: after.length === 1 ? `Case #${after[0].id} is now yours` : `${after.length} cases are now yours`,
        text: [
          `Hello ${target.display_name},`,
          '',
          `${req.user!.displayName} has handed you ${count}:`,
          ...lines,
          ...(input.note ? ['', `Note: ${input.note}`] : []),
          '',
          `Open your queue: ${d.config.publicUrl}/queue`,
        ].join('\n'),
        purpose: 'reassignment',
        related: { type: 'user', id: String(to) },
      })
      .catch((err) => logger().warn({ err: (err as Error).message }, 'reassignment e-mail not queued'));
  }
  return { cases: after.map(toSummary), assignee: { id: to, displayName: target.display_name } };
}
