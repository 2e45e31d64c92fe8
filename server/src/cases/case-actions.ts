import { QueryTypes, type Transaction } from 'sequelize';
import type { Redis } from 'ioredis';
import type { Request } from 'express';
import type { Database } from '../db/database';
import type { Config } from '../config/index';
import { AppError } from '../lib/app-error';
import { auditRequest } from '../audit/record-audit';
import { appendAudit } from '../audit/audit-repository';
import { actorFromRequest } from '../audit/record-audit';
import { publishEvents } from '../events/event-bus';
import type { MailQueue } from '../mail/mail-queue';
import type { OutgoingEvents } from '../outgoing/outgoing-events';
import { dispositionSchema, SCORE_CAUTION, type CaseSummary } from '@shared/api/cases';
import type { z } from 'zod';
import { getCaseRow, toSummary, type CaseRow } from './case-queries';
import { caseViewer, requireVisibleCase, visibleCaseSql, type CaseViewer } from './case-access';
import { approvalLimitMinor, readSupervisionSettings } from '../settings/supervision-settings';
import { demoCardholderContact } from '../demo/demo-directory';

export interface CaseDeps {
  db: Database;
  redis: Redis;
  config: Config;
  mail: MailQueue;
  outgoing: OutgoingEvents;
}

const OPEN = new Set(['new', 'claimed', 'waiting_cardholder', 'escalated', 'awaiting_approval']);

const idOrNull = (v: number | null) => (v === null ? null : Number(v));

async function changed(d: CaseDeps, after: CaseRow, previousAssigneeId?: number | null) {
  await publishEvents(d.redis, d.config.REDIS_PREFIX, [
    {
      type: 'case.changed',
      caseId: Number(after.id),
      status: after.status,
      assigneeId: idOrNull(after.assignee_id),
      previousAssigneeId,
      teamId: idOrNull(after.team_id),
      at: new Date().toISOString(),
    },
  ]).catch(() => undefined);
}

/**
 * The case for an action, locked when inside a transaction, and only if the
 * caller may see it. Actions call `requireVisibleCase` first (which audits a
 * refusal outside any transaction); this check closes the gap to a
 * reassignment in between.
 */
async function mustGet(d: CaseDeps, req: Request, id: number, t?: Transaction): Promise<CaseRow> {
  const row = await getCaseRow(d.db, id, { forUpdate: !!t, transaction: t, viewer: await caseViewer(d.db, req) });
  if (!row) throw AppError.notFound('No such case.');
  return row;
}

/** The case after an action the caller was allowed: read whatever the caller may see now (releasing may hand it back to a team). */
async function reread(d: CaseDeps, id: number): Promise<CaseRow> {
  const row = await getCaseRow(d.db, id);
  if (!row) throw AppError.notFound('No such case.');
  return row;
}

/** Investigators may act on cases they hold; supervisors on any open case. */
function assertMayWork(req: Request, row: CaseRow) {
  if (!OPEN.has(row.status)) throw AppError.conflict('This case is closed.', 'case_closed');
  const user = req.user!;
  if (user.role === 'supervisor') return;
  if (row.assignee_id !== null && Number(row.assignee_id) !== user.id) {
    throw AppError.conflict(`This case is held by ${row.assignee_name ?? 'someone else'}. Claim it first.`, 'not_your_case');
  }
}

/**
 * Claims a case for the caller in one conditional UPDATE: of two people
 * clicking at once, exactly one changes the row; the other is told who did.
 */
export async function claimCase(d: CaseDeps, req: Request, id: number): Promise<CaseSummary> {
  const me = req.user!.id;
  await requireVisibleCase(d.db, req, id, 'case.claim');
  const visible = visibleCaseSql(await caseViewer(d.db, req));
  const [, affected] = (await d.db.sequelize.query(
    `UPDATE cases c SET c.assignee_id = :me, c.status = 'claimed', c.claimed_at = UTC_TIMESTAMP(3), c.version = c.version + 1, c.updated_at = UTC_TIMESTAMP(3)
     WHERE c.id = :id AND c.status = 'new' AND (c.assignee_id IS NULL OR c.assignee_id = :me) AND ${visible.sql}`,
    { replacements: { ...visible.replacements, me, id }, type: QueryTypes.UPDATE },
  )) as unknown as [unknown, number];
  const row = await mustGet(d, req, id);
  if (affected !== 1 && Number(row.assignee_id) !== me) {
    await auditRequest(d.db, req, { action: 'case.claim', targetType: 'case', targetId: id, outcome: 'denied', details: { heldBy: row.assignee_name } });
    throw new AppError({
      status: 409,
      code: 'already_claimed',
      message: row.assignee_id === null ? `This case is ${row.status.replace('_', ' ')} and cannot be claimed.` : `Already claimed by ${row.assignee_name}.`,
      extra: { claimedBy: row.assignee_id === null ? null : { id: Number(row.assignee_id), displayName: row.assignee_name } },
    });
  }
  if (affected === 1) {
    await auditRequest(d.db, req, { action: 'case.claim', targetType: 'case', targetId: id, outcome: 'success' });
    await changed(d, row, null);
  }
  return toSummary(row);
}

export async function releaseCase(d: CaseDeps, req: Request, id: number): Promise<CaseSummary> {
  await requireVisibleCase(d.db, req, id, 'case.release');
  const row = await d.db.sequelize.transaction(async (t) => {
    const r = await mustGet(d, req, id, t);
    assertMayWork(req, r);
    await d.db.sequelize.query(
      "UPDATE cases SET assignee_id = NULL, claimed_at = NULL, status = IF(status IN ('claimed', 'waiting_cardholder'), 'new', status), version = version + 1, updated_at = UTC_TIMESTAMP(3) WHERE id = ?",
      { replacements: [id], type: QueryTypes.UPDATE, transaction: t },
    );
    return r;
  });
  await auditRequest(d.db, req, { action: 'case.release', targetType: 'case', targetId: id, outcome: 'success' });
  const after = await reread(d, id);
  await changed(d, after, idOrNull(row.assignee_id));
  return toSummary(after);
}

export async function setCaseStatus(d: CaseDeps, req: Request, id: number, status: 'claimed' | 'waiting_cardholder'): Promise<CaseSummary> {
  await requireVisibleCase(d.db, req, id, 'case.status');
  await d.db.sequelize.transaction(async (t) => {
    const r = await mustGet(d, req, id, t);
    assertMayWork(req, r);
    if (r.status === 'awaiting_approval') throw AppError.conflict('The case waits for a supervisor’s approval.', 'awaiting_approval');
    await d.db.sequelize.query(
      'UPDATE cases SET status = :status, claimed_at = COALESCE(claimed_at, UTC_TIMESTAMP(3)), assignee_id = COALESCE(assignee_id, :me), version = version + 1, updated_at = UTC_TIMESTAMP(3) WHERE id = :id',
      { replacements: { status, me: req.user!.id, id }, type: QueryTypes.UPDATE, transaction: t },
    );
  });
  await auditRequest(d.db, req, { action: 'case.status', targetType: 'case', targetId: id, outcome: 'success', details: { status } });
  const after = await reread(d, id);
  await changed(d, after);
  return toSummary(after);
}

export async function escalateCase(d: CaseDeps, req: Request, id: number, reason: string): Promise<CaseSummary> {
  await requireVisibleCase(d.db, req, id, 'case.escalate');
  await d.db.sequelize.transaction(async (t) => {
    const r = await mustGet(d, req, id, t);
    assertMayWork(req, r);
    await d.db.sequelize.query(
      "UPDATE cases SET status = 'escalated', escalation_reason = :reason, claimed_at = COALESCE(claimed_at, UTC_TIMESTAMP(3)), assignee_id = COALESCE(assignee_id, :me), version = version + 1, updated_at = UTC_TIMESTAMP(3) WHERE id = :id",
      { replacements: { reason, me: req.user!.id, id }, type: QueryTypes.UPDATE, transaction: t },
    );
  });
  await auditRequest(d.db, req, { action: 'case.escalate', targetType: 'case', targetId: id, outcome: 'success', details: { reason } });
  const after = await reread(d, id);
  await changed(d, after);
  return toSummary(after);
}

export async function addNote(d: CaseDeps, req: Request, id: number, text: string) {
  await requireVisibleCase(d.db, req, id, 'case.note');
  const row = await mustGet(d, req, id);
  if (!OPEN.has(row.status) && req.user!.role !== 'supervisor') throw AppError.conflict('This case is closed.', 'case_closed');
  const now = new Date();
  const [noteId] = (await d.db.sequelize.query('INSERT INTO case_notes (case_id, author_id, text, created_at) VALUES (?, ?, ?, ?)', {
    replacements: [id, req.user!.id, text, now],
    type: QueryTypes.INSERT,
  })) as unknown as [number];
  await auditRequest(d.db, req, { action: 'case.note', targetType: 'case', targetId: id, outcome: 'success', details: { noteId: Number(noteId), length: text.length } });
  return { id: Number(noteId), author: { id: req.user!.id, displayName: req.user!.displayName }, text, createdAt: now.toISOString() };
}

/** E-mails the cardholder through the mail queue; the message is kept on the case with its delivery status. */
export async function contactCardholder(d: CaseDeps, req: Request, id: number, input: { subject: string; message: string }) {
  await requireVisibleCase(d.db, req, id, 'case.contact');
  const row = await mustGet(d, req, id);
  assertMayWork(req, row);
  const [holder] = await d.db.sequelize.query<{ email: string | null; display_name: string | null }>('SELECT email, display_name FROM cardholders WHERE ref = ?', {
    replacements: [row.cardholder_ref],
    type: QueryTypes.SELECT,
  });
  const email = holder?.email ?? (d.config.EDGECASE_MODE !== 'production' ? demoCardholderContact(row.cardholder_ref)?.email : null);
  if (!email) throw AppError.conflict('No e-mail address is on file for this cardholder.', 'no_contact');
  const now = new Date();
  const [messageId] = (await d.db.sequelize.query(
    "INSERT INTO case_messages (case_id, to_address, subject, text, sent_by, status, created_at, updated_at) VALUES (?, ?, ?, ?, ?, 'queued', ?, ?)",
    { replacements: [id, email, input.subject, input.message, req.user!.id, now, now], type: QueryTypes.INSERT },
  )) as unknown as [number];
  await d.mail.send({
    to: [email],
    subject: input.subject,
    text: `${input.message}\n\n— Fraud team (case #${id}). This message refers to your card ending ${row.last4}.`,
    purpose: 'cardholder-contact',
    related: { type: 'case_message', id: String(messageId) },
  });
  await auditRequest(d.db, req, { action: 'case.contact', targetType: 'case', targetId: id, outcome: 'success', details: { messageId: Number(messageId) } });
  return { id: Number(messageId), to: email, subject: input.subject, text: input.message, sentBy: { id: req.user!.id, displayName: req.user!.displayName }, createdAt: now.toISOString(), status: 'queued' as const };
}

/** Blocks or unblocks the card, and tells the upstream system through the outbox (exactly the same transaction). */
export async function setCardStatus(d: CaseDeps, req: Request, id: number, input: { action: 'block' | 'unblock'; reason: string }) {
  await requireVisibleCase(d.db, req, id, `card.${input.action}`);
  const result = await d.db.sequelize.transaction(async (t) => {
    const row = await mustGet(d, req, id, t);
    assertMayWork(req, row);
    const status = input.action === 'block' ? 'blocked' : 'active';
    await d.db.sequelize.query('UPDATE cards SET status = ?, status_changed_at = UTC_TIMESTAMP(3), updated_at = UTC_TIMESTAMP(3) WHERE id = ?', {
      replacements: [status, row.card_id],
      type: QueryTypes.UPDATE,
      transaction: t,
    });
    const [last] = await d.db.sequelize.query<{ external_id: string }>('SELECT external_id FROM transactions WHERE card_id = ? ORDER BY occurred_at DESC LIMIT 1', {
      replacements: [row.card_id],
      type: QueryTypes.SELECT,
      transaction: t,
    });
    const eventId = await d.outgoing.record(
      t,
      input.action === 'block' ? 'card.blocked' : 'card.unblocked',
      {
        card: { bin: row.bin, last4: row.last4, cardholderId: row.cardholder_ref, lastTransactionId: last?.external_id ?? null },
        caseId: id,
        reason: input.reason,
        decidedBy: req.user!.email,
        at: new Date().toISOString(),
      },
    );
    await appendAudit(d.db, { ...actorFromRequest(req), action: `card.${input.action}`, targetType: 'case', targetId: id, outcome: 'success', details: { reason: input.reason, outgoingEventId: eventId, caution: SCORE_CAUTION } }, t);
    return { bin: row.bin, last4: row.last4, status, eventId };
  });
  await d.outgoing.dispatch(result.eventId).catch(() => undefined);
  return { bin: result.bin, last4: result.last4, status: result.status };
}

type DispositionOutput = z.output<typeof dispositionSchema>;

function toMinor(amount: string | undefined, exponent: number): number | null {
  if (amount === undefined) return null;
  const [i, f = ''] = amount.split('.');
  if (f.length > exponent) throw AppError.badRequest('The amount has more decimals than its currency allows.', [{ path: 'amountConfirmed', message: `At most ${exponent} decimals` }]);
  return Number(i) * 10 ** exponent + Number((f + '0'.repeat(exponent)).slice(0, exponent) || '0');
}

/** A decision as it is applied: amounts already in the case's minor units. */
export interface DispositionDecision {
  disposition: DispositionOutput['disposition'];
  fraudType: string | null;
  reason: string;
  confirmedMinor: number | null;
  recoveredMinor: number | null;
}

/**
 * Closes a case with a disposition: confirmed fraud and legitimate write one
 * training label per alerted transaction of the case (inconclusive writes
 * none: it is not a label); the case leaves the queue and the card may open a
 * new case later. Both paths close through here: a direct disposition, and an
 * approved four-eyes proposal (then `decidedBy` is the proposer, who made the
 * call and is named on the labels, and the request's user, the approver,
 * closes the case).
 */
export async function applyDisposition(
  d: Pick<CaseDeps, 'db'>,
  t: Transaction,
  req: Request,
  id: number,
  decision: DispositionDecision,
  who: { decidedBy: number; approvalId?: number },
): Promise<void> {
  if (decision.disposition !== 'inconclusive') {
    const label = decision.disposition === 'confirmed_fraud' ? 'fraud' : 'legitimate';
    await d.db.sequelize.query(
      `INSERT INTO labels (transaction_id, label, fraud_type, source, reported_at, case_id, created_by, created_at)
       SELECT a.transaction_id, :label, :fraudType, 'disposition', UTC_TIMESTAMP(3), :caseId, :decidedBy, UTC_TIMESTAMP(3) FROM alerts a WHERE a.case_id = :caseId`,
      { replacements: { label, fraudType: decision.fraudType, caseId: id, decidedBy: who.decidedBy }, type: QueryTypes.INSERT, transaction: t },
    );
  }
  await d.db.sequelize.query(
    `UPDATE cases SET status = 'closed', open_card_id = NULL, disposition = :disposition, disposition_reason = :reason, fraud_type = :fraudType,
            amount_confirmed_minor = :confirmed, amount_recovered_minor = :recovered, closed_at = UTC_TIMESTAMP(3), closed_by = :me,
            claimed_at = COALESCE(claimed_at, UTC_TIMESTAMP(3)), assignee_id = COALESCE(assignee_id, :decidedBy), version = version + 1, updated_at = UTC_TIMESTAMP(3)
     WHERE id = :id`,
    {
      replacements: {
        disposition: decision.disposition,
        reason: decision.reason,
        fraudType: decision.fraudType,
        confirmed: decision.confirmedMinor,
        recovered: decision.recoveredMinor,
        me: req.user!.id,
        decidedBy: who.decidedBy,
        id,
      },
      type: QueryTypes.UPDATE,
      transaction: t,
    },
  );
  await appendAudit(
    d.db,
    {
      ...actorFromRequest(req),
      action: 'case.disposition',
      targetType: 'case',
      targetId: id,
      outcome: 'success',
      details: {
        disposition: decision.disposition,
        fraudType: decision.fraudType,
        reason: decision.reason,
        amountConfirmedMinor: decision.confirmedMinor,
        amountRecoveredMinor: decision.recoveredMinor,
        ...(who.approvalId === undefined ? {} : { approvalId: who.approvalId, proposedBy: who.decidedBy }),
      },
    },
    t,
  );
}

/**
 * Decides a case. A decision on a version the investigator did not see is
 * refused (409), so nobody closes a case that changed under them. Above the
 * four-eyes limit (amount at risk, in the case's own currency) the decision is
 * only proposed: stored in `case_approvals`, the case waits in
 * `awaiting_approval` and no label is written until a second person approves.
 */
export async function disposeCase(
  d: CaseDeps,
  req: Request,
  id: number,
  input: DispositionOutput,
): Promise<{ case: CaseSummary; nextCaseId: number | null; approval: { id: number; status: 'pending'; limit: number } | null }> {
  const me = req.user!;
  await requireVisibleCase(d.db, req, id, 'case.disposition');
  const approval = await d.db.sequelize.transaction(async (t) => {
    const row = await mustGet(d, req, id, t);
    assertMayWork(req, row);
    if (row.status === 'awaiting_approval') throw AppError.conflict('The case waits for a supervisor’s approval.', 'awaiting_approval');
    if (Number(row.version) !== input.version) throw AppError.conflict('The case changed since you opened it. Reload and decide again.', 'stale_case');
    const exp = Number(row.currency_exponent);
    const decision: DispositionDecision = {
      disposition: input.disposition,
      fraudType: input.fraudType ?? null,
      reason: input.reason,
      confirmedMinor: toMinor(input.amountConfirmed, exp),
      recoveredMinor: toMinor(input.amountRecovered, exp),
    };
    const policy = await readSupervisionSettings(d.db, t);
    const limit = approvalLimitMinor(policy, exp);
    if (limit === null || Number(row.amount_at_risk_minor) <= limit) {
      await applyDisposition(d, t, req, id, decision, { decidedBy: me.id });
      return null;
    }
    const [approvalId] = (await d.db.sequelize.query(
      `INSERT INTO case_approvals (case_id, proposed_by, disposition, fraud_type, reason, amount_confirmed_minor, amount_recovered_minor, status, created_at)
       VALUES (?, ?, ?, ?, ?, ?, ?, 'pending', UTC_TIMESTAMP(3))`,
      {
        replacements: [id, me.id, decision.disposition, decision.fraudType, decision.reason, decision.confirmedMinor, decision.recoveredMinor],
        type: QueryTypes.INSERT,
        transaction: t,
      },
    )) as unknown as [number];
    await d.db.sequelize.query(
      "UPDATE cases SET status = 'awaiting_approval', claimed_at = COALESCE(claimed_at, UTC_TIMESTAMP(3)), assignee_id = COALESCE(assignee_id, :me), version = version + 1, updated_at = UTC_TIMESTAMP(3) WHERE id = :id",
      { replacements: { me: me.id, id }, type: QueryTypes.UPDATE, transaction: t },
    );
    await appendAudit(
      d.db,
      {
        ...actorFromRequest(req),
        action: 'case.disposition_proposed',
        targetType: 'case',
        targetId: id,
        outcome: 'success',
        details: { approvalId: Number(approvalId), disposition: decision.disposition, fraudType: decision.fraudType, reason: decision.reason, approvalLimit: policy.approvalLimit },
      },
      t,
    );
    return { id: Number(approvalId), status: 'pending' as const, limit: policy.approvalLimit! };
  });
  const after = await reread(d, id);
  await changed(d, after);
  return { case: toSummary(after), nextCaseId: await nextCaseFor(d.db, await caseViewer(d.db, req)), approval };
}

/** The next case for a person: their own open claimed case first, else the top unassigned new one they may see. */
export async function nextCaseFor(db: Database, viewer: CaseViewer): Promise<number | null> {
  const [mine] = await db.sequelize.query<{ id: number }>(
    "SELECT id FROM cases WHERE is_open = 1 AND assignee_id = ? AND status IN ('claimed', 'new') ORDER BY priority_rank DESC, sla_due_at ASC LIMIT 1",
    { replacements: [viewer.userId], type: QueryTypes.SELECT },
  );
  if (mine) return Number(mine.id);
  const visible = visibleCaseSql(viewer);
  const [free] = await db.sequelize.query<{ id: number }>(
    `SELECT c.id FROM cases c WHERE c.is_open = 1 AND c.assignee_id IS NULL AND c.status = 'new' AND ${visible.sql} ORDER BY c.priority_rank DESC, c.sla_due_at ASC LIMIT 1`,
    { replacements: visible.replacements, type: QueryTypes.SELECT },
  );
  return free ? Number(free.id) : null;
}
