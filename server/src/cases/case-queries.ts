import { QueryTypes } from 'sequelize';
import type { Database } from '../db/database';
import { mccInfo } from '@shared/reference/mcc';
import type { CaseStatus, CaseSummary, Priority, QueueResponse, queueQuerySchema } from '@shared/api/cases';
import type { z } from 'zod';
import { visibleCaseSql, type CaseViewer } from './case-access';

type QueueQuery = z.output<typeof queueQuerySchema>;

export interface CaseRow {
  id: number;
  status: CaseStatus;
  priority: Priority;
  assignee_id: number | null;
  assignee_name: string | null;
  team_id: number | null;
  team_name: string | null;
  card_id: number;
  bin: string;
  last4: string;
  card_status: 'active' | 'blocked';
  cardholder_ref: string;
  highest_probability: number;
  highest_margin: number;
  amount_at_risk_minor: number;
  currency: string;
  currency_exponent: number;
  alert_count: number;
  first_alert_at: Date;
  last_alert_at: Date;
  sla_due_at: Date;
  mcc: string;
  merchant_country: string;
  channel: string;
  updated_at: Date;
  version: number;
  disposition: 'confirmed_fraud' | 'legitimate' | 'inconclusive' | null;
  closed_at: Date | null;
}

// The team's name by a subquery on its primary key, so every query naming `cases c` can select these columns whatever it joins.
export const CASE_COLUMNS = `
  c.id, c.status, c.priority, c.assignee_id, u.display_name AS assignee_name,
  c.team_id, (SELECT tg.name FROM investigator_groups tg WHERE tg.id = c.team_id) AS team_name, c.card_id, k.bin, k.last4, k.status AS card_status,
  k.cardholder_ref, c.highest_probability, c.highest_margin, c.amount_at_risk_minor, c.currency, c.currency_exponent, c.alert_count,
  c.first_alert_at, c.last_alert_at, c.sla_due_at, c.mcc, c.merchant_country, c.channel, c.updated_at, c.version, c.disposition, c.closed_at`;

export const CASE_FROM = 'FROM cases c JOIN cards k ON k.id = c.card_id LEFT JOIN users u ON u.id = c.assignee_id';

const iso = (d: Date | string) => new Date(d).toISOString();

export function toSummary(r: CaseRow): CaseSummary {
  return {
    id: Number(r.id),
    status: r.status,
    priority: r.priority,
    assignee: r.assignee_id === null ? null : { id: Number(r.assignee_id), displayName: r.assignee_name ?? `#${r.assignee_id}` },
    team: r.team_id === null ? null : { id: Number(r.team_id), name: r.team_name ?? `Team #${r.team_id}` },
    card: { bin: r.bin, last4: r.last4, status: r.card_status },
    probability: r.highest_probability,
    normalizedMargin: r.highest_margin,
    amountAtRisk: { minor: Number(r.amount_at_risk_minor), currency: r.currency, exponent: Number(r.currency_exponent) },
    alertCount: Number(r.alert_count),
    firstAlertAt: iso(r.first_alert_at),
    lastAlertAt: iso(r.last_alert_at),
    slaDueAt: iso(r.sla_due_at),
    mcc: r.mcc,
    mccLabel: mccInfo(r.mcc)?.description ?? null,
    merchantCountry: r.merchant_country,
    channel: r.channel,
    updatedAt: iso(r.updated_at),
    version: Number(r.version),
  };
}

/** ORDER BY per sort key; each leads with an indexed column after `is_open`, with the id as a stable tie-break. */
const SORTS: Record<QueueQuery['sort'], (dir: 'ASC' | 'DESC') => string> = {
  probability: (d) => `c.highest_probability ${d}, c.id ${d}`,
  amount: (d) => `c.amount_at_risk_minor ${d}, c.id ${d}`,
  // "age desc" = oldest first.
  age: (d) => `c.first_alert_at ${d === 'DESC' ? 'ASC' : 'DESC'}, c.id ${d === 'DESC' ? 'ASC' : 'DESC'}`,
  slaDue: (d) => `c.sla_due_at ${d}, c.id ${d}`,
  lastAlert: (d) => `c.last_alert_at ${d}, c.id ${d}`,
  status: (d) => `c.status ${d}, c.id ${d}`,
  // "priority desc" = most urgent first, and within a band the soonest due.
  priority: (d) => `c.priority_rank ${d}, c.sla_due_at ${d === 'DESC' ? 'ASC' : 'DESC'}, c.id ${d === 'DESC' ? 'ASC' : 'DESC'}`,
  id: (d) => `c.id ${d}`,
};

/** The queue page: filtered, sorted and paginated in the database, with the total count of matches; only cases the viewer may see. */
export async function listQueue(db: Database, q: QueueQuery, viewer: CaseViewer): Promise<QueueResponse> {
  const userId = viewer.userId;
  const visible = visibleCaseSql(viewer);
  const where: string[] = viewer.anyTeam ? [] : [visible.sql];
  const rep: Record<string, unknown> = { ...visible.replacements };
  const closedAsked = q.status?.includes('closed');
  if (!closedAsked) where.push('c.is_open = 1');
  if (q.status?.length) {
    where.push('c.status IN (:status)');
    rep.status = q.status;
  }
  if (q.view === 'mine') {
    where.push('c.assignee_id = :me');
    rep.me = userId;
  } else if (q.view === 'unassigned') where.push('c.assignee_id IS NULL');
  if (q.assignee !== undefined) {
    where.push('c.assignee_id = :assignee');
    rep.assignee = q.assignee;
  }
  if (q.priority?.length) {
    where.push('c.priority IN (:priority)');
    rep.priority = q.priority;
  }
  if (q.mcc?.length) {
    where.push('c.mcc IN (:mcc)');
    rep.mcc = q.mcc;
  }
  if (q.country?.length) {
    where.push('c.merchant_country IN (:country)');
    rep.country = q.country;
  }
  if (q.channel?.length) {
    where.push('c.channel IN (:channel)');
    rep.channel = q.channel;
  }
  if (q.minProbability !== undefined) {
    where.push('c.highest_probability >= :minP');
    rep.minP = q.minProbability;
  }
  if (q.maxProbability !== undefined) {
    where.push('c.highest_probability <= :maxP');
    rep.maxP = q.maxProbability;
  }
  if (q.minAmount !== undefined) {
    // Amounts compare in each case's own minor units.
    where.push('c.amount_at_risk_minor >= :minAmount * POW(10, c.currency_exponent)');
    rep.minAmount = q.minAmount;
  }
  if (q.dueWithinMinutes !== undefined) {
    where.push('c.sla_due_at <= DATE_ADD(UTC_TIMESTAMP(3), INTERVAL :due MINUTE)');
    rep.due = q.dueWithinMinutes;
  }
  if (q.q) {
    const term = q.q.replace(/\s+/g, '');
    if (/^\d{4}$/.test(term)) {
      // The cards first (index on last4), then their cases by card id: matching last4 through the join
      // tested every open case. A last four shared by very many cards falls back to the join.
      const cards = await db.sequelize.query<{ id: number }>('SELECT id FROM cards WHERE last4 = ? LIMIT 1001', { replacements: [term], type: QueryTypes.SELECT });
      if (cards.length > 1000) where.push('(k.last4 = :term OR c.id = :termNum)');
      else if (cards.length > 0) where.push('(c.card_id IN (:cardIds) OR c.id = :termNum)');
      else where.push('c.id = :termNum');
      rep.cardIds = cards.map((r) => Number(r.id));
      rep.term = term;
      rep.termNum = Number(term);
    } else if (/^\d{6}$/.test(term)) {
      where.push('(k.bin = :term OR c.id = :termNum)');
      rep.term = term;
      rep.termNum = Number(term);
    } else if (/^#?\d{1,10}$/.test(term)) {
      where.push('c.id = :termNum');
      rep.termNum = Number(term.replace('#', ''));
    } else {
      where.push('1 = 0');
    }
  }
  const whereSql = where.length ? `WHERE ${where.join(' AND ')}` : '';
  const order = SORTS[q.sort](q.order === 'asc' ? 'ASC' : 'DESC');
  const offset = (q.page - 1) * q.pageSize;
  const [rows, count] = await Promise.all([
    db.sequelize.query<CaseRow>(`SELECT ${CASE_COLUMNS} ${CASE_FROM} ${whereSql} ORDER BY ${order} LIMIT :limit OFFSET :offset`, {
      replacements: { ...rep, limit: q.pageSize, offset },
      type: QueryTypes.SELECT,
    }),
    db.sequelize.query<{ n: number }>(`SELECT COUNT(*) AS n FROM cases c ${whereSql.includes('k.') ? 'JOIN cards k ON k.id = c.card_id' : ''} ${whereSql}`, {
      replacements: rep,
      type: QueryTypes.SELECT,
    }),
  ]);
  return { items: rows.map(toSummary), total: Number(count[0]?.n ?? 0), page: q.page, pageSize: q.pageSize, serverTime: new Date().toISOString() };
}

/** One case; with a viewer, only if they may see it (null otherwise, as for a missing case). */
export async function getCaseRow(db: Database, id: number, opts: { forUpdate?: boolean; transaction?: unknown; viewer?: CaseViewer } = {}): Promise<CaseRow | null> {
  const visible = opts.viewer ? visibleCaseSql(opts.viewer) : { sql: '1 = 1', replacements: {} };
  const rows = await db.sequelize.query<CaseRow>(`SELECT ${CASE_COLUMNS} ${CASE_FROM} WHERE c.id = :id AND ${visible.sql} ${opts.forUpdate ? 'FOR UPDATE' : ''}`, {
    replacements: { ...visible.replacements, id },
    type: QueryTypes.SELECT,
    transaction: opts.transaction as never,
  });
  return rows[0] ?? null;
}
