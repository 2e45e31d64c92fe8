import { randomUUID } from 'node:crypto';
import { QueryTypes, type Transaction } from 'sequelize';
import type { Database } from '../db/database';
import type { NormalisedTransaction } from '@shared/api/transactions';
import { sqlDateTime } from '../db/sql-date';
import { bindRows } from '../db/bind-rows';
import { rawQuery } from '../db/raw-query';
import { LRUCache } from 'lru-cache';
import { perDatabase } from '../db/per-database';

export type TransactionSource = 'api' | 'decision' | 'csv' | 'seed';

/** Inserts of the rows a read-back did not find, at most (see storeTransactions). */
const MAX_PASSES = 4;

/**
 * Card ids by keyed card hash, per database, of cards known to be committed. A card row is never
 * changed or deleted once made, so a known card needs neither the upsert nor the read-back: a
 * request on a card seen before skips both round trips. Filled only after a commit
 * (`rememberCards`), never from inside a transaction that might still roll back.
 */
const cardCache = perDatabase(() => new LRUCache<string, number>({ max: 200_000 }));

/** Records card ids a committed store returned (see knownCards). */
export function rememberCards(db: Database, cardIds: Map<string, number>): void {
  const c = cardCache(db);
  for (const [hash, id] of cardIds) c.set(hash, id);
}

/** What the API tells a caller about a stored transaction. */
export interface TransactionView {
  id: string;
  transactionId: number;
  status: 'accepted' | 'scored';
  occurredAt: string;
  receivedAt: string;
  score: null | {
    probability: number;
    margin: number;
    normalizedMargin: number;
    modelVersionId: number;
    reasons: { feature: string; value: number | string | null; contribution: number; text: string }[];
    scoredAt: string;
  };
  alerted: boolean;
  caseId: number | null;
}

/**
 * Stores a batch: cards upserted by their keyed hash, transactions inserted
 * with INSERT IGNORE on the upstream id. Rows carrying this call's batch tag
 * are the new ones; any other row with the same id is a duplicate, answered
 * with what was stored before. Returns internal ids by upstream id.
 */
export async function storeTransactions(
  db: Database,
  items: NormalisedTransaction[],
  meta: {
    source: TransactionSource;
    apiKeyId: number | null;
    receivedAt: Date;
    /** Upstream ids whose score the caller writes in the same database transaction: inserted as scored, not queued. */
    scored?: ReadonlySet<string>;
  },
  outer?: Transaction,
): Promise<{ batch: string; inserted: Map<string, number>; existing: Map<string, number>; cardIds: Map<string, number> }> {
  const batch = randomUUID();
  const inserted = new Map<string, number>();
  const existing = new Map<string, number>();
  const cardId = new Map<string, number>();
  if (items.length === 0) return { batch, inserted, existing, cardIds: cardId };
  const receivedAt = sqlDateTime(meta.receivedAt);
  const run = async (t: Transaction) => {
    const cards = new Map<string, NormalisedTransaction['card']>();
    const known = cardCache(db);
    for (const it of items) {
      const id = known.get(it.card.panHash);
      if (id === undefined) cards.set(it.card.panHash, it.card);
      else cardId.set(it.card.panHash, id);
    }
    // Sorted, so concurrent batches lock card rows in the same order and cannot deadlock on them.
    const cardRows = [...cards.values()].sort((a, b) => (a.panHash < b.panHash ? -1 : 1));
    // Insert, then read back what the insert did not return; whatever the read does not find is
    // inserted again. Under concurrency InnoDB can count a row as a duplicate and skip it (IGNORE)
    // although no row with that key ends up committed (the conflicting insert was rolled back), so
    // "not found after the insert" happens and must not turn into a lost card or a transaction
    // answered "duplicate". The reads are locking reads: they see the newest committed rows, not this
    // transaction's snapshot. RETURNING names the cards this statement made, so a batch of new cards
    // (the usual case: known ones are cached) needs no read at all.
    for (let pass = 0, todo = cardRows; todo.length > 0; pass += 1, todo = todo.filter((c) => !cardId.has(c.panHash))) {
      if (pass === MAX_PASSES) throw new Error(`storeTransactions: ${todo.length} card rows still missing after ${MAX_PASSES} inserts`);
      const values = bindRows(todo.map((c) => [c.panHash, c.bin, c.last4, c.cardholderId, 'active', receivedAt, receivedAt]));
      const made = await rawQuery<{ id: number; pan_hash: string }[]>(
        t,
        `INSERT IGNORE INTO cards (pan_hash, bin, last4, cardholder_ref, status, created_at, updated_at) VALUES ${values.sql} RETURNING id, pan_hash`,
        values.values,
      );
      for (const r of made) cardId.set(r.pan_hash, Number(r.id));
      const unnamed = todo.filter((c) => !cardId.has(c.panHash)).map((c) => c.panHash);
      if (unnamed.length === 0) continue;
      const ids = await rawQuery<{ id: number; pan_hash: string }[]>(t, 'SELECT id, pan_hash FROM cards WHERE pan_hash IN (?) LOCK IN SHARE MODE', [unnamed]);
      for (const r of ids) cardId.set(r.pan_hash, Number(r.id));
    }
    const cols =
      '(external_id, source, ingest_batch, api_key_id, card_id, occurred_at, received_at, amount_minor, currency, currency_exponent, merchant_ref, merchant_name, mcc, merchant_country, card_present, channel, device_id, ip, lat, lon, status)';
    const found = new Set<string>();
    // INSERT IGNORE ... RETURNING names the rows this statement inserted (MariaDB 10.5+): those are
    // new. Only ids it did not return need the locking read, which finds the duplicates (or finds
    // nothing, after a skip as described above, and they are inserted again).
    for (let pass = 0, todo = items; todo.length > 0; pass += 1, todo = todo.filter((x) => !found.has(x.externalId))) {
      if (pass === MAX_PASSES) throw new Error(`storeTransactions: ${todo.length} transactions still missing after ${MAX_PASSES} inserts`);
      for (let i = 0; i < todo.length; i += 500) {
        const values = bindRows(
          todo.slice(i, i + 500).map((x) => [
            x.externalId,
            meta.source,
            batch,
            meta.apiKeyId,
            cardId.get(x.card.panHash),
            sqlDateTime(x.occurredAt),
            receivedAt,
            x.amountMinor,
            x.currency,
            x.currencyExponent,
            x.merchant.id,
            x.merchant.name,
            x.merchant.mcc,
            x.merchant.country,
            x.cardPresent,
            x.channel,
            x.deviceId ?? null,
            x.ip ?? null,
            x.lat ?? null,
            x.lon ?? null,
            meta.scored?.has(x.externalId) ? 'scored' : 'accepted',
          ]),
        );
        const returned = await rawQuery<{ id: number; external_id: string }[]>(
          t,
          `INSERT IGNORE INTO transactions ${cols} VALUES ${values.sql} RETURNING id, external_id`,
          values.values,
        );
        for (const r of returned) {
          found.add(r.external_id);
          inserted.set(r.external_id, Number(r.id));
        }
      }
      const rest = todo.filter((x) => !found.has(x.externalId));
      if (rest.length === 0) break;
      const got = await rawQuery<{ id: number; external_id: string; ingest_batch: string }[]>(
        t,
        'SELECT id, external_id, ingest_batch FROM transactions WHERE external_id IN (?) LOCK IN SHARE MODE',
        [rest.map((x) => x.externalId)],
      );
      for (const r of got) {
        found.add(r.external_id);
        (r.ingest_batch === batch ? inserted : existing).set(r.external_id, Number(r.id));
      }
    }
  };
  if (outer) await run(outer);
  else await db.sequelize.transaction(run);
  return { batch, inserted, existing, cardIds: cardId };
}

interface ViewRow {
  id: number;
  external_id: string;
  status: 'accepted' | 'scored';
  occurred_at: Date;
  received_at: Date;
  probability: number | null;
  margin: number | null;
  normalized_margin: number | null;
  model_version_id: number | null;
  reasons: string | null;
  scored_at: Date | null;
  alerted: number | null;
  case_id: number | null;
}

/** The current view of transactions by upstream id (status, score, reasons, alert and case). */
export async function viewTransactions(db: Database, externalIds: string[]): Promise<Map<string, TransactionView>> {
  const out = new Map<string, TransactionView>();
  if (externalIds.length === 0) return out;
  const rows = await db.sequelize.query<ViewRow>(
    `SELECT t.id, t.external_id, t.status, t.occurred_at, t.received_at, s.probability, s.margin, s.normalized_margin,
            s.model_version_id, s.reasons, s.scored_at, s.alerted, a.case_id
     FROM transactions t
     LEFT JOIN transaction_scores s ON s.transaction_id = t.id
     LEFT JOIN alerts a ON a.transaction_id = t.id
     WHERE t.external_id IN (:ids)`,
    { replacements: { ids: externalIds }, type: QueryTypes.SELECT },
  );
  for (const r of rows) {
    out.set(r.external_id, {
      id: r.external_id,
      transactionId: Number(r.id),
      status: r.status,
      occurredAt: new Date(r.occurred_at).toISOString(),
      receivedAt: new Date(r.received_at).toISOString(),
      score:
        r.probability === null
          ? null
          : {
              probability: r.probability,
              margin: r.margin!,
              normalizedMargin: r.normalized_margin!,
              modelVersionId: Number(r.model_version_id),
              reasons: JSON.parse(r.reasons ?? '[]'),
              scoredAt: new Date(r.scored_at!).toISOString(),
            },
      alerted: Boolean(r.alerted),
      caseId: r.case_id === null ? null : Number(r.case_id),
    });
  }
  return out;
}
