import { QueryTypes, type Transaction } from 'sequelize';
import type { NormalisedTransaction, TransactionLabel } from '@shared/api/transactions';
import { featureRow } from '@shared/features/definitions';
import { isHighRiskMcc } from '@shared/reference/mcc';
import type { Database } from '../db/database';
import { retryOnDeadlock } from '../db/retry-deadlock';
import { AppError } from '../lib/app-error';
import { storeTransactions, type TransactionSource } from '../ingest/transaction-repository';
import type { VelocityStore } from '../scoring/velocity';

export type LabelSource = 'backfill' | 'seed';

export interface HistoricalLabel {
  label: TransactionLabel;
  fraudType: string | null;
  reportedAt: Date;
}

export interface HistoricalItem {
  t: NormalisedTransaction;
  label: HistoricalLabel | null;
}

/**
 * accepted: stored now, as historical, with features (and its label).
 * duplicate: the id was stored before (or earlier in the same batch) for the same card.
 * conflict: the id is stored for another card; nothing was recorded for this item.
 */
export type HistoricalOutcome = { status: 'accepted' | 'duplicate' | 'conflict'; transactionId: number | null; labelAdded: boolean };

export interface HistoricalMeta {
  source: TransactionSource;
  labelSource: LabelSource;
  receivedAt: Date;
  /** Staff member recorded as the labels' author (null for the system). */
  createdBy: number | null;
  /**
   * Record labels of items whose transaction was already stored (a late chargeback
   * file), skipping a label the same source already gave that transaction.
   */
  labelExisting: boolean;
}

/** A chunk waits on live ingest's short transactions; a few tries with a growing random pause get through. */
const DEADLOCK_RETRIES = 8;

const placeholders = (rows: number, width: number) => Array.from({ length: rows }, () => `(${Array(width).fill('?').join(', ')})`).join(', ');

/**
 * Stores a batch of history the way back-fill must: tokenised rows inserted
 * idempotently by upstream id, marked historical in the same database
 * transaction (so the requeue sweeper never sees them as waiting to be scored),
 * features computed through the live velocity state in time order, and labels
 * recorded. Everything for the batch commits together; a deadlock (on the
 * card index next to live ingest's new cards) retries the whole batch after a
 * random pause that grows with each try, which is safe because velocity
 * observations are idempotent per transaction id; when the tries run out the
 * batch is refused with a 503 (nothing of it kept). Returns one outcome per
 * item, in the items' order.
 */
export async function storeHistoricalBatch(
  db: Database,
  velocity: VelocityStore,
  items: readonly HistoricalItem[],
  meta: HistoricalMeta,
): Promise<HistoricalOutcome[]> {
  if (items.length === 0) return [];
  return retryOnDeadlock(() => db.sequelize.transaction((t) => storeInTransaction(db, velocity, items, meta, t)), {
    retries: DEADLOCK_RETRIES,
    pauseMs: (attempt) => 10 + Math.random() * 40 * (attempt + 1),
    refuse: () => AppError.unavailable('The database is busy with concurrent writes to the same cards; nothing of this part was kept. Retry shortly.', 2),
  });
}

async function storeInTransaction(
  db: Database,
  velocity: VelocityStore,
  items: readonly HistoricalItem[],
  meta: HistoricalMeta,
  t: Transaction,
): Promise<HistoricalOutcome[]> {
  // The first occurrence of an id is stored; later ones in the batch are repeats of it.
  const first = new Map<string, number>();
  items.forEach((it, i) => {
    if (!first.has(it.t.externalId)) first.set(it.t.externalId, i);
  });
  const unique = [...first.values()].map((i) => items[i].t);
  const stored = await storeTransactions(db, unique, { source: meta.source, apiKeyId: null, receivedAt: meta.receivedAt }, t);
  const newIds = [...stored.inserted.values()];
  if (newIds.length > 0) {
    await db.sequelize.query("UPDATE transactions SET status = 'historical' WHERE id IN (:ids)", {
      replacements: { ids: newIds },
      type: QueryTypes.UPDATE,
      transaction: t,
    });
  }

  const existingCard = await cardsOfExisting(db, stored.existing, t);
  const outcomes: HistoricalOutcome[] = items.map((it, i) => {
    const id = it.t.externalId;
    const firstIndex = first.get(id)!;
    const newId = stored.inserted.get(id);
    if (newId !== undefined) {
      if (i === firstIndex) return { status: 'accepted', transactionId: newId, labelAdded: false };
      const same = items[firstIndex].t.card.panHash === it.t.card.panHash;
      return { status: same ? 'duplicate' : 'conflict', transactionId: same ? newId : null, labelAdded: false };
    }
    const oldId = stored.existing.get(id)!;
    const same = existingCard.get(oldId) === it.t.card.panHash;
    return { status: same ? 'duplicate' : 'conflict', transactionId: same ? oldId : null, labelAdded: false };
  });

  await storeFeatures(db, velocity, items, outcomes, meta.receivedAt, t);
  await storeLabels(db, items, outcomes, meta, t);
  return outcomes;
}

async function cardsOfExisting(db: Database, existing: Map<string, number>, t: Transaction): Promise<Map<number, string>> {
  if (existing.size === 0) return new Map();
  const rows = await db.sequelize.query<{ id: number; pan_hash: string }>(
    'SELECT t.id, c.pan_hash FROM transactions t JOIN cards c ON c.id = t.card_id WHERE t.id IN (:ids)',
    { replacements: { ids: [...existing.values()] }, type: QueryTypes.SELECT, transaction: t },
  );
  return new Map(rows.map((r) => [Number(r.id), r.pan_hash]));
}

async function storeFeatures(
  db: Database,
  velocity: VelocityStore,
  items: readonly HistoricalItem[],
  outcomes: readonly HistoricalOutcome[],
  computedAt: Date,
  t: Transaction,
): Promise<void> {
  // Time order within the batch: velocity counts what came before each transaction.
  const fresh = items
    .map((it, i) => ({ t: it.t, id: outcomes[i].transactionId! }))
    .filter((_x, i) => outcomes[i].status === 'accepted')
    .sort((a, b) => a.t.occurredAt.getTime() - b.t.occurredAt.getTime());
  if (fresh.length === 0) return;
  const snaps = await velocity.observeMany(
    fresh.map(({ t: x }) => ({
      cardKey: x.card.panHash,
      event: {
        transactionId: x.externalId,
        occurredAt: x.occurredAt,
        amount: x.amount,
        merchantRef: x.merchant.id,
        merchantCountry: x.merchant.country,
        lat: x.lat,
        lon: x.lon,
        deviceId: x.deviceId,
      },
    })),
  );
  const values = fresh.flatMap(({ t: x, id }, i) => {
    const row = featureRow(
      {
        amount: x.amount,
        mcc: x.merchant.mcc,
        mccHighRisk: isHighRiskMcc(x.merchant.mcc),
        merchantCountry: x.merchant.country,
        cardPresent: x.cardPresent,
        channel: x.channel,
        occurredAt: x.occurredAt,
      },
      snaps[i],
    );
    return [id, JSON.stringify(row), computedAt];
  });
  await db.sequelize.query(`INSERT IGNORE INTO transaction_features (transaction_id, features, computed_at) VALUES ${placeholders(fresh.length, 3)}`, {
    replacements: values,
    type: QueryTypes.INSERT,
    transaction: t,
  });
}

async function storeLabels(
  db: Database,
  items: readonly HistoricalItem[],
  outcomes: HistoricalOutcome[],
  meta: HistoricalMeta,
  t: Transaction,
): Promise<void> {
  const wanted = items.flatMap((it, i) => {
    const o = outcomes[i];
    if (!it.label || o.transactionId === null) return [];
    if (o.status === 'accepted' || (o.status === 'duplicate' && meta.labelExisting)) return [{ i, id: o.transactionId, label: it.label }];
    return [];
  });
  if (wanted.length === 0) return;

  // What this source already said about these transactions. Locking the transaction rows
  // first makes two uploads of one chargeback file take turns instead of both adding it.
  const ids = [...new Set(wanted.map((w) => w.id))];
  await db.sequelize.query('SELECT id FROM transactions WHERE id IN (:ids) ORDER BY id FOR UPDATE', {
    replacements: { ids },
    type: QueryTypes.SELECT,
    transaction: t,
  });
  const prior = await db.sequelize.query<{ transaction_id: number; label: TransactionLabel }>(
    'SELECT transaction_id, label FROM labels WHERE transaction_id IN (:ids) AND source = :source',
    { replacements: { ids, source: meta.labelSource }, type: QueryTypes.SELECT, transaction: t },
  );
  const said = new Set(prior.map((p) => `${Number(p.transaction_id)}|${p.label}`));
  const values: unknown[] = [];
  for (const w of wanted) {
    const key = `${w.id}|${w.label.label}`;
    if (said.has(key)) continue;
    said.add(key);
    outcomes[w.i].labelAdded = true;
    values.push(w.id, w.label.label, w.label.fraudType, meta.labelSource, w.label.reportedAt, meta.createdBy, meta.receivedAt);
  }
  if (values.length === 0) return;
  await db.sequelize.query(
    `INSERT INTO labels (transaction_id, label, fraud_type, source, reported_at, created_by, created_at) VALUES ${placeholders(values.length / 7, 7)}`,
    { replacements: values, type: QueryTypes.INSERT, transaction: t },
  );
}
