import { QueryTypes } from 'sequelize';
import type { z } from 'zod';
import type { Database } from '../db/database';
import type { AuditFacets, AuditItem, AuditPage, auditQuerySchema } from '@shared/api/audit';

export type AuditFilter = z.output<typeof auditQuerySchema>;

interface Row {
  id: number;
  occurred_at: Date;
  actor_type: AuditItem['actorType'];
  actor_id: string | null;
  actor_label: string | null;
  action: string;
  target_type: string | null;
  target_id: string | null;
  outcome: AuditItem['outcome'];
  ip: string | null;
  user_agent: string | null;
  details: string | null;
  prev_hash: string;
  hash: string;
}

/** WHERE clause of a filter; every value goes in as a replacement. */
export function auditWhere(f: Omit<AuditFilter, 'page' | 'pageSize'>): { sql: string; rep: Record<string, unknown> } {
  const where: string[] = [];
  const rep: Record<string, unknown> = {};
  if (f.actorId !== undefined) {
    where.push("actor_type = 'user' AND actor_id = :actorId");
    rep.actorId = String(f.actorId);
  }
  if (f.action) {
    if (f.action.endsWith('.')) {
      // A family: "case." matches case.claim, case.note ... (the pattern allows no LIKE wildcards but _, escaped here).
      where.push("action LIKE :actionPrefix ESCAPE '!'");
      rep.actionPrefix = `${f.action.replace(/[!_%]/g, (c) => `!${c}`)}%`;
    } else {
      where.push('action = :action');
      rep.action = f.action;
    }
  }
  if (f.targetType) {
    where.push('target_type = :targetType');
    rep.targetType = f.targetType;
  }
  if (f.targetId) {
    where.push('target_id = :targetId');
    rep.targetId = f.targetId;
  }
  if (f.outcome) {
    where.push('outcome = :outcome');
    rep.outcome = f.outcome;
  }
  if (f.from) {
    where.push('occurred_at >= :from');
    rep.from = new Date(f.from);
  }
  if (f.to) {
    where.push('occurred_at <= :to');
    rep.to = new Date(f.to);
  }
  return { sql: where.length ? `WHERE ${where.join(' AND ')}` : '', rep };
}

function parseDetails(s: string | null): Record<string, unknown> | null {
  if (!s) return null;
  try {
    const v = JSON.parse(s) as unknown;
    return v && typeof v === 'object' && !Array.isArray(v) ? (v as Record<string, unknown>) : { value: v };
  } catch {
    return { text: s };
  }
}

const toItem = (r: Row): AuditItem => ({
  id: Number(r.id),
  occurredAt: new Date(r.occurred_at).toISOString(),
  actorType: r.actor_type,
  actorId: r.actor_id,
  actorLabel: r.actor_label,
  action: r.action,
  targetType: r.target_type,
  targetId: r.target_id,
  outcome: r.outcome,
  ip: r.ip,
  details: parseDetails(r.details),
});

/** One page, newest first, and the number of rows the filter matches. */
export async function searchAudit(db: Database, f: AuditFilter): Promise<AuditPage> {
  const { sql, rep } = auditWhere(f);
  const [rows, count] = await Promise.all([
    db.sequelize.query<Row>(`SELECT * FROM audit_log ${sql} ORDER BY id DESC LIMIT :limit OFFSET :offset`, {
      replacements: { ...rep, limit: f.pageSize, offset: (f.page - 1) * f.pageSize },
      type: QueryTypes.SELECT,
    }),
    db.sequelize.query<{ n: number }>(`SELECT COUNT(*) AS n FROM audit_log ${sql}`, { replacements: rep, type: QueryTypes.SELECT }),
  ]);
  return { items: rows.map(toItem), total: Number(count[0]?.n ?? 0), page: f.page, pageSize: f.pageSize };
}

export const CSV_HEADER = ['id', 'occurred_at', 'actor_type', 'actor_id', 'actor_label', 'action', 'target_type', 'target_id', 'outcome', 'ip', 'user_agent', 'details', 'prev_hash', 'hash'];

/** Matching rows oldest first (the chain's order), read in batches by id, at most `max`. */
export async function* auditRowsForExport(db: Database, f: Omit<AuditFilter, 'page' | 'pageSize'>, max: number, batch = 1_000): AsyncGenerator<unknown[]> {
  const { sql, rep } = auditWhere(f);
  let lastId = 0;
  let sent = 0;
  while (sent < max) {
    const rows = await db.sequelize.query<Row>(
      `SELECT * FROM audit_log ${sql ? `${sql} AND` : 'WHERE'} id > :lastId ORDER BY id LIMIT :limit`,
      { replacements: { ...rep, lastId, limit: Math.min(batch, max - sent) }, type: QueryTypes.SELECT },
    );
    if (rows.length === 0) return;
    for (const r of rows) {
      yield [r.id, new Date(r.occurred_at).toISOString(), r.actor_type, r.actor_id, r.actor_label, r.action, r.target_type, r.target_id, r.outcome, r.ip, r.user_agent, r.details, r.prev_hash, r.hash];
    }
    sent += rows.length;
    lastId = Number(rows[rows.length - 1].id);
  }
}

export async function auditFacets(db: Database): Promise<AuditFacets> {
  const [actions, people, targets] = await Promise.all([
    db.sequelize.query<{ action: string }>('SELECT DISTINCT action FROM audit_log ORDER BY action', { type: QueryTypes.SELECT }),
    db.sequelize.query<{ id: number; display_name: string; email: string }>('SELECT id, display_name, email FROM users ORDER BY display_name', { type: QueryTypes.SELECT }),
    db.sequelize.query<{ target_type: string }>('SELECT DISTINCT target_type FROM audit_log WHERE target_type IS NOT NULL ORDER BY target_type', { type: QueryTypes.SELECT }),
  ]);
  return {
    actions: actions.map((a) => a.action),
    people: people.map((p) => ({ id: Number(p.id), label: `${p.display_name} (${p.email})` })),
    targetTypes: targets.map((t) => t.target_type),
  };
}
