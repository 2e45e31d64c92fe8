import { createHash } from 'node:crypto';
import { Op, QueryTypes, type Transaction } from 'sequelize';
import type { Database } from '../db/database';
import { scrubDigits } from '../lib/logger';
import { maskPansInText } from '@shared/card/pan';

export type AuditOutcome = 'success' | 'failure' | 'denied';
export type ActorType = 'user' | 'api_key' | 'system' | 'anonymous';

export interface AuditEntry {
  actorType: ActorType;
  actorId?: string | number | null;
  actorLabel?: string | null;
  action: string;
  targetType?: string | null;
  targetId?: string | number | null;
  outcome: AuditOutcome;
  ip?: string | null;
  userAgent?: string | null;
  details?: Record<string, unknown> | null;
}

export interface AuditRow {
  id: number;
  occurredAt: string;
  actorType: ActorType;
  actorId: string | null;
  actorLabel: string | null;
  action: string;
  targetType: string | null;
  targetId: string | null;
  outcome: AuditOutcome;
  ip: string | null;
  userAgent: string | null;
  details: string | null;
  prevHash: string;
  hash: string;
}

const GENESIS = '0'.repeat(64);

/**
 * The hash of one row: SHA-256 over the previous hash and the row's fields in a
 * fixed order. Anyone holding the rows can recompute the chain.
 */
export function auditRowHash(prevHash: string, r: Omit<AuditRow, 'id' | 'hash' | 'prevHash'> & { id: number }): string {
  const canonical = JSON.stringify([
    r.id,
    r.occurredAt,
    r.actorType,
    r.actorId,
    r.actorLabel,
    r.action,
    r.targetType,
    r.targetId,
    r.outcome,
    r.ip,
    r.userAgent,
    r.details,
  ]);
  return createHash('sha256').update(prevHash).update('\n').update(canonical).digest('hex');
}

function str(v: string | number | null | undefined, max: number): string | null {
  if (v === null || v === undefined) return null;
  return String(v).slice(0, max);
}

/** Free text from outside (a typed sign-in name, a User-Agent): kept, but never a card number in it (the log is long-lived and append-only). */
const text = (v: string | null | undefined, max: number): string | null => (v === null || v === undefined ? null : maskPansInText(String(v)).slice(0, max));

/** Appends one audit row, extending the hash chain under a row lock on the chain head. */
export async function appendAudit(db: Database, entry: AuditEntry, outer?: Transaction): Promise<AuditRow> {
  const run = async (t: Transaction): Promise<AuditRow> => {
    const [head] = await db.sequelize.query<{ last_id: number; last_hash: string }>(
      'SELECT last_id, last_hash FROM audit_chain_head WHERE id = 1 FOR UPDATE',
      { type: QueryTypes.SELECT, transaction: t },
    );
    const prevHash = head?.last_hash ?? GENESIS;
    const occurredAt = new Date();
    const details = entry.details ? scrubDigits(JSON.stringify(entry.details)).slice(0, 60_000) : null;
    const base = {
      occurredAt: occurredAt.toISOString(),
      actorType: entry.actorType,
      actorId: str(entry.actorId, 64),
      actorLabel: text(entry.actorLabel, 254),
      action: entry.action.slice(0, 64),
      targetType: str(entry.targetType, 32),
      targetId: str(entry.targetId, 64),
      outcome: entry.outcome,
      ip: str(entry.ip, 45),
      userAgent: text(entry.userAgent, 255),
      details,
    };
    // The update trigger forbids sealing a row after insert, so the id comes from the
    // locked chain head and the hash is computed before the insert.
    const id = Number(head?.last_id ?? 0) + 1;
    const hash = auditRowHash(prevHash, { id, ...base });
    await db.models.AuditLog.create(
      { id, ...base, occurredAt, prevHash, hash },
      { transaction: t },
    );
    await db.sequelize.query('UPDATE audit_chain_head SET last_id = ?, last_hash = ? WHERE id = 1', {
      replacements: [id, hash],
      type: QueryTypes.UPDATE,
      transaction: t,
    });
    return { id, ...base, prevHash, hash };
  };
  if (outer) return run(outer);
  return db.sequelize.transaction(run);
}

export interface ChainVerification {
  ok: boolean;
  checked: number;
  /** The first row whose stored hash or link does not match, if any. */
  firstBadId?: number;
  reason?: string;
}

/** Recomputes the whole chain in id order and reports the first row that does not match. */
export async function verifyAuditChain(db: Database, batchSize = 5_000): Promise<ChainVerification> {
  let prev = GENESIS;
  let lastId = 0;
  let checked = 0;
  for (;;) {
    const rows = await db.models.AuditLog.findAll({
      where: { id: { [Op.gt]: lastId } },
      order: [['id', 'ASC']],
      limit: batchSize,
      raw: true,
    });
    if (rows.length === 0) break;
    for (const r of rows) {
      const occurredAt = new Date(r.occurredAt).toISOString();
      if (r.prevHash !== prev) {
        return { ok: false, checked, firstBadId: Number(r.id), reason: 'link to the previous row is broken' };
      }
      const expected = auditRowHash(prev, { ...r, id: Number(r.id), occurredAt });
      if (expected !== r.hash) {
        return { ok: false, checked, firstBadId: Number(r.id), reason: 'row content does not match its hash' };
      }
      prev = r.hash;
      lastId = Number(r.id);
      checked += 1;
    }
  }
  return { ok: true, checked };
}
