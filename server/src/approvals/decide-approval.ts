import { QueryTypes } from 'sequelize';
import type { Request } from 'express';
import { AppError } from '../lib/app-error';
import { appendAudit } from '../audit/audit-repository';
import { actorFromRequest, auditRequest } from '../audit/record-audit';
import { publishEvents } from '../events/event-bus';
import { applyDisposition, type CaseDeps } from '../cases/case-actions';
import { getCaseRow, toSummary } from '../cases/case-queries';
import type { CaseSummary } from '@shared/api/cases';
import { getApprovalRow } from './approval-repository';

type Verdict = { kind: 'approve'; note?: string } | { kind: 'reject'; note: string };

/**
 * A second person decides a proposed disposition. Approval closes the case and
 * writes its labels exactly as a direct disposition does (the same function);
 * rejection returns the case to its proposer, claimed, with the note on the
 * case. The proposer can never decide their own proposal, whatever their role.
 */
export async function decideApproval(d: CaseDeps, req: Request, approvalId: number, verdict: Verdict): Promise<{ case: CaseSummary }> {
  const me = req.user!;
  const action = verdict.kind === 'approve' ? 'case.approval_approved' : 'case.approval_rejected';
  const peek = await getApprovalRow(d.db, approvalId);
  if (!peek) throw AppError.notFound('No such approval.');
  if (Number(peek.proposed_by) === me.id) {
    await auditRequest(d.db, req, { action, targetType: 'case', targetId: peek.case_id, outcome: 'denied', details: { approvalId, reason: 'own proposal' } });
    throw new AppError({ status: 403, code: 'own_proposal', message: 'You proposed this decision: another supervisor has to approve or return it.' });
  }

  const outcome = await d.db.sequelize.transaction(async (t) => {
    const a = await getApprovalRow(d.db, approvalId, t);
    if (!a || a.status !== 'pending') throw AppError.conflict(`This proposal was ${a?.status ?? 'withdrawn'} already.`, 'approval_decided');
    const caseId = Number(a.case_id);
    const row = await getCaseRow(d.db, caseId, { forUpdate: true, transaction: t });
    if (!row || row.status !== 'awaiting_approval') throw AppError.conflict('The case no longer waits for approval.', 'not_awaiting_approval');
    const proposer = Number(a.proposed_by);
    if (verdict.kind === 'approve') {
      await applyDisposition(
        d,
        t,
        req,
        caseId,
        {
          disposition: a.disposition,
          fraudType: a.fraud_type,
          reason: a.reason,
          confirmedMinor: a.amount_confirmed_minor === null ? null : Number(a.amount_confirmed_minor),
          recoveredMinor: a.amount_recovered_minor === null ? null : Number(a.amount_recovered_minor),
        },
        { decidedBy: proposer, approvalId },
      );
    } else {
      await d.db.sequelize.query(
        "UPDATE cases SET status = 'claimed', assignee_id = :proposer, claimed_at = COALESCE(claimed_at, UTC_TIMESTAMP(3)), version = version + 1, updated_at = UTC_TIMESTAMP(3) WHERE id = :id",
        { replacements: { proposer, id: caseId }, type: QueryTypes.UPDATE, transaction: t },
      );
      await d.db.sequelize.query('INSERT INTO case_notes (case_id, author_id, text, created_at) VALUES (?, ?, ?, UTC_TIMESTAMP(3))', {
        replacements: [caseId, me.id, `Returned without approval: ${verdict.note}`],
        type: QueryTypes.INSERT,
        transaction: t,
      });
    }
    await d.db.sequelize.query(
      'UPDATE case_approvals SET status = ?, decided_by = ?, decided_at = UTC_TIMESTAMP(3), decision_note = ? WHERE id = ?',
      { replacements: [verdict.kind === 'approve' ? 'approved' : 'rejected', me.id, verdict.note ?? null, approvalId], type: QueryTypes.UPDATE, transaction: t },
    );
    await appendAudit(
      d.db,
      {
        ...actorFromRequest(req),
        action,
        targetType: 'case',
        targetId: caseId,
        outcome: 'success',
        details: { approvalId, proposedBy: proposer, disposition: a.disposition, note: verdict.note ?? null },
      },
      t,
    );
    return { caseId, previousAssigneeId: row.assignee_id === null ? null : Number(row.assignee_id) };
  });

  const after = await getCaseRow(d.db, outcome.caseId);
  await publishEvents(d.redis, d.config.REDIS_PREFIX, [
    {
      type: 'case.changed',
      caseId: outcome.caseId,
      status: after!.status,
      assigneeId: after!.assignee_id === null ? null : Number(after!.assignee_id),
      previousAssigneeId: outcome.previousAssigneeId,
      teamId: after!.team_id === null ? null : Number(after!.team_id),
      at: new Date().toISOString(),
    },
  ]).catch(() => undefined);
  return { case: toSummary(after!) };
}
