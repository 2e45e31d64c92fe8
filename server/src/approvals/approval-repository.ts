import { QueryTypes, type Transaction } from 'sequelize';
import type { Database } from '../db/database';
import type { ApprovalStatus, CaseApproval } from '@shared/api/supervision';
import type { Disposition, FraudType } from '@shared/api/cases';
import { CASE_COLUMNS, toSummary, type CaseRow } from '../cases/case-queries';

export interface ApprovalRow {
  id: number;
  case_id: number;
  proposed_by: number;
  disposition: Disposition;
  fraud_type: string | null;
  reason: string;
  amount_confirmed_minor: number | null;
  amount_recovered_minor: number | null;
  status: ApprovalStatus;
  decided_by: number | null;
  decided_at: Date | null;
  decision_note: string | null;
  created_at: Date;
}

export async function getApprovalRow(db: Database, id: number, t?: Transaction): Promise<ApprovalRow | null> {
  const rows = await db.sequelize.query<ApprovalRow>(`SELECT * FROM case_approvals WHERE id = ? ${t ? 'FOR UPDATE' : ''}`, {
    replacements: [id],
    type: QueryTypes.SELECT,
    transaction: t,
  });
  return rows[0] ?? null;
}

type ListRow = CaseRow & {
  a_id: number;
  a_proposed_by: number;
  a_proposer_name: string;
  a_disposition: Disposition;
  a_fraud_type: string | null;
  a_reason: string;
  a_confirmed: number | null;
  a_recovered: number | null;
  a_status: ApprovalStatus;
  a_created_at: Date;
  a_decided_by: number | null;
  a_decider_name: string | null;
  a_decided_at: Date | null;
  a_note: string | null;
};

/** Approvals with their case, newest first for decided ones, oldest first (waiting longest) for pending ones. */
export async function listApprovals(db: Database, status: ApprovalStatus, limit = 200): Promise<CaseApproval[]> {
  const rows = await db.sequelize.query<ListRow>(
    `SELECT ${CASE_COLUMNS}, ap.id AS a_id, ap.proposed_by AS a_proposed_by, pu.display_name AS a_proposer_name, ap.disposition AS a_disposition,
            ap.fraud_type AS a_fraud_type, ap.reason AS a_reason, ap.amount_confirmed_minor AS a_confirmed, ap.amount_recovered_minor AS a_recovered,
            ap.status AS a_status, ap.created_at AS a_created_at, ap.decided_by AS a_decided_by, du.display_name AS a_decider_name,
            ap.decided_at AS a_decided_at, ap.decision_note AS a_note
     FROM case_approvals ap
     JOIN cases c ON c.id = ap.case_id JOIN cards k ON k.id = c.card_id LEFT JOIN users u ON u.id = c.assignee_id
     JOIN users pu ON pu.id = ap.proposed_by LEFT JOIN users du ON du.id = ap.decided_by
     WHERE ap.status = ?
     ORDER BY ${status === 'pending' ? 'ap.created_at ASC' : 'ap.decided_at DESC'}, ap.id
     LIMIT ?`,
    { replacements: [status, limit], type: QueryTypes.SELECT },
  );
  return rows.map((r) => {
    const money = (minor: number | null) => (minor === null ? null : { minor: Number(minor), currency: r.currency, exponent: Number(r.currency_exponent) });
    return {
      id: Number(r.a_id),
      caseId: Number(r.id),
      case: toSummary(r),
      proposedBy: { id: Number(r.a_proposed_by), displayName: r.a_proposer_name },
      disposition: r.a_disposition,
      fraudType: r.a_fraud_type as FraudType | null,
      reason: r.a_reason,
      amountConfirmed: money(r.a_confirmed),
      amountRecovered: money(r.a_recovered),
      status: r.a_status,
      createdAt: new Date(r.a_created_at).toISOString(),
      decidedBy: r.a_decided_by === null ? null : { id: Number(r.a_decided_by), displayName: r.a_decider_name ?? `#${r.a_decided_by}` },
      decidedAt: r.a_decided_at ? new Date(r.a_decided_at).toISOString() : null,
      note: r.a_note,
    };
  });
}
