import { QueryTypes, type Transaction } from 'sequelize';
import type { Redis } from 'ioredis';
import type { Database } from '../db/database';
import { LRUCache } from 'lru-cache';
import { perDatabase } from '../db/per-database';
import { retryOnDeadlock } from '../db/retry-deadlock';
import { bindRows } from '../db/bind-rows';
import { rawQuery } from '../db/raw-query';
import { featureRow, type VelocitySnapshot } from '@shared/features/definitions';
import type { NormalisedTransaction } from '@shared/api/transactions';
import { topContributions, type Row } from '@shared/model/index';
import { isHighRiskMcc } from '@shared/reference/mcc';
import type { LoadedModel } from '../model-registry/model-repository';
import { priorityFor, type AlertingSettings } from '../settings/settings-repository';
import { publishEvents, type DomainEvent } from '../events/event-bus';
import type { VelocityStore } from './velocity';
import { routeNewCase } from '../routing/route-new-case';

/** Reason codes kept with every score: the largest contributions, in raw units. */
const REASONS_KEPT = 6;

export interface ScoringContext {
  db: Database;
  redis: Redis;
  redisPrefix: string;
  velocity: VelocityStore;
  champion: LoadedModel;
  challenger: LoadedModel | null;
  settings: AlertingSettings;
}

/** A stored transaction as scoring reads it (joined with its card's hash). */
export interface PendingRow {
  id: number;
  external_id: string;
  card_id: number;
  pan_hash: string;
  occurred_at: Date;
  received_at: Date;
  amount_minor: number;
  currency: string;
  currency_exponent: number;
  merchant_ref: string;
  mcc: string;
  merchant_country: string;
  card_present: number;
  channel: string;
  device_id: string | null;
  lat: number | null;
  lon: number | null;
}

export interface Reason {
  feature: string;
  value: number | string | null;
  contribution: number;
  text: string;
}

export interface ScoreOutcome {
  transactionId: number;
  externalId: string;
  margin: number;
  normalizedMargin: number;
  probability: number;
  reasons: Reason[];
  features: Row;
  alerted: boolean;
  /** The champion that scored it and the alert threshold in force then. */
  modelVersionId: number;
  threshold: number;
  /** The challenger's score of the same features, kept in shadow; null without a challenger. */
  shadow: null | { modelVersionId: number; margin: number; probability: number; wouldAlert: boolean };
}

/** What scoring commits for one transaction: its outcome, the row it was computed from, and the alerting settings used. */
export interface ScoredRow {
  o: ScoreOutcome;
  r: PendingRow;
  settings: AlertingSettings;
}

/** Scores one feature row with a loaded model: margin, normalised margin, probability, top reasons. */
export function scoreRowWith(m: LoadedModel, row: Row) {
  const margin = m.compiled.score(row);
  const normalizedMargin = m.compiled.totalAlpha > 0 ? margin / m.compiled.totalAlpha : 0;
  const probability = m.compiled.probability(margin);
  const reasons = topContributions(m.model, row, REASONS_KEPT).map((c) => ({ feature: c.feature, value: c.value, contribution: c.contribution, text: c.text }));
  return { margin, normalizedMargin, probability, reasons };
}

/** The accepted rows among the ids, locked: a second worker handed the same ids waits here, then finds them scored. */
const LOCK_PENDING = `
  SELECT id, external_id, card_id, occurred_at, received_at, amount_minor, currency, currency_exponent,
         merchant_ref, mcc, merchant_country, card_present, channel, device_id, lat, lon
  FROM transactions
  WHERE id IN (?) AND status = 'accepted'
  FOR UPDATE`;

/**
 * Card hashes by card id, per database. A card row never changes once made, so its hash is read
 * once; the locking read above then needs no join (a join would lock the card rows too, against
 * ingest's upserts of the same cards).
 */
const cardHashes = perDatabase(() => new LRUCache<number, string>({ max: 200_000 }));

async function panHashesOf(db: Database, t: Transaction, cardIds: number[]): Promise<Map<number, string>> {
  const cache = cardHashes(db);
  const out = new Map<number, string>();
  const missing: number[] = [];
  for (const id of new Set(cardIds)) {
    const hash = cache.get(id);
    if (hash === undefined) missing.push(id);
    else out.set(id, hash);
  }
  if (missing.length > 0) {
    const rows = await rawQuery<{ id: number; pan_hash: string }[]>(t, 'SELECT id, pan_hash FROM cards WHERE id IN (?)', [missing]);
    for (const r of rows) {
      out.set(Number(r.id), r.pan_hash);
      cache.set(Number(r.id), r.pan_hash);
    }
  }
  return out;
}

/**
 * Scores accepted transactions exactly once. Within one database transaction
 * the rows are locked (FOR UPDATE), so a second worker handed the same ids
 * waits and then finds them scored; velocity, features, scores, alerts and
 * case updates happen under that lock and commit together or not at all.
 * Velocity state is idempotent per transaction id, so a retry after a crash
 * (or a deadlock) sees the same features it saw the first time.
 */
export async function scoreTransactions(ctx: ScoringContext, ids: number[]): Promise<ScoreOutcome[]> {
  if (ids.length === 0) return [];
  const { db } = ctx;
  let outcomes: ScoreOutcome[] = [];
  let events: DomainEvent[] = [];

  // A deadlock with a concurrent ingest or scoring transaction is retried here after a short random
  // pause: failing the job would wait for the queue's backoff (half a second and more) instead.
  await retryOnDeadlock(
    () =>
      db.sequelize.transaction(async (t) => {
        outcomes = [];
        events = [];
        const locked = await rawQuery<Omit<PendingRow, 'pan_hash'>[]>(t, LOCK_PENDING, [ids]);
        if (locked.length === 0) return;
        const hashes = await panHashesOf(db, t, locked.map((r) => Number(r.card_id)));
        const candidates: PendingRow[] = locked
          .map((r) => ({ ...r, pan_hash: hashes.get(Number(r.card_id))! }))
          .sort((a, b) => new Date(a.occurred_at).getTime() - new Date(b.occurred_at).getTime() || a.id - b.id);
        const snapshots = await ctx.velocity.observeMany(
          candidates.map((r) => ({
            cardKey: r.pan_hash,
            event: {
              transactionId: r.external_id,
              occurredAt: new Date(r.occurred_at),
              amount: r.amount_minor / 10 ** r.currency_exponent,
              merchantRef: r.merchant_ref,
              merchantCountry: r.merchant_country,
              lat: r.lat,
              lon: r.lon,
              deviceId: r.device_id,
            },
          })),
        );
        outcomes = candidates.map((r, i) => scorePendingRow(ctx, r, snapshots[i]));
        events = await commitScores(
          db,
          t,
          outcomes.map((o, i) => ({ o, r: candidates[i], settings: ctx.settings })),
          { markScored: true },
        );
      }),
    {
      retries: 8,
      pauseMs: (attempt) => 2 + Math.random() * 10 * (attempt + 1),
      // Out of tries: the job fails and the queue retries it later; nothing of this try was kept.
      refuse: () => new Error('scoring: deadlocked on every try; the job will be retried'),
    },
  );

  // Only alerts are announced: an event per scored transaction went to every subscriber (web servers
  // and workers), each parsing it, and nobody listened to it.
  await publishEvents(ctx.redis, ctx.redisPrefix, events).catch(() => undefined);
  return outcomes;
}

/**
 * Writes what scoring decided, inside the caller's database transaction: features, score, shadow
 * score, the status (unless the rows were inserted already scored) and, for each alert, its case.
 * Returns the events to publish once the transaction has committed.
 */
export async function commitScores(db: Database, t: Transaction, todo: ScoredRow[], opts: { markScored: boolean }): Promise<DomainEvent[]> {
  const events: DomainEvent[] = [];
  if (todo.length === 0) return events;
  const now = new Date();
  await bulkInsert(
    t,
    'INSERT IGNORE INTO transaction_features (transaction_id, features, computed_at) VALUES',
    todo.map(({ o }) => [o.transactionId, JSON.stringify(o.features), now]),
  );
  await bulkInsert(
    t,
    'INSERT IGNORE INTO transaction_scores (transaction_id, model_version_id, margin, normalized_margin, probability, reasons, alerted, threshold, scored_at, latency_ms) VALUES',
    todo.map(({ o, r }) => [
      o.transactionId,
      o.modelVersionId,
      o.margin,
      o.normalizedMargin,
      o.probability,
      JSON.stringify(o.reasons),
      o.alerted,
      o.threshold,
      now,
      Math.max(0, now.getTime() - new Date(r.received_at).getTime()),
    ]),
  );
  const shadowed = todo.filter(({ o }) => o.shadow);
  if (shadowed.length > 0) {
    await bulkInsert(
      t,
      'INSERT IGNORE INTO shadow_scores (transaction_id, model_version_id, margin, probability, would_alert, scored_at) VALUES',
      shadowed.map(({ o }) => [o.transactionId, o.shadow!.modelVersionId, o.shadow!.margin, o.shadow!.probability, o.shadow!.wouldAlert, now]),
    );
  }
  if (opts.markScored) {
    await rawQuery(t, "UPDATE transactions SET status = 'scored' WHERE id IN (?)", [todo.map(({ o }) => o.transactionId)]);
  }
  for (const row of todo) {
    if (row.o.alerted) events.push(await raiseAlert(db, t, row));
  }
  return events;
}

/** The row scoring reads, built from a transaction as ingest normalised it (for scoring before it is stored). */
export function pendingRowOf(t: NormalisedTransaction, ids: { id: number; cardId: number }, receivedAt: Date): PendingRow {
  return {
    id: ids.id,
    external_id: t.externalId,
    card_id: ids.cardId,
    pan_hash: t.card.panHash,
    occurred_at: t.occurredAt,
    received_at: receivedAt,
    amount_minor: t.amountMinor,
    currency: t.currency,
    currency_exponent: t.currencyExponent,
    merchant_ref: t.merchant.id,
    mcc: t.merchant.mcc,
    merchant_country: t.merchant.country,
    card_present: t.cardPresent ? 1 : 0,
    channel: t.channel,
    device_id: t.deviceId ?? null,
    lat: t.lat ?? null,
    lon: t.lon ?? null,
  };
}

/** Features and score of one stored transaction with the context's champion (and challenger, in shadow). */
export function scorePendingRow(ctx: Pick<ScoringContext, 'champion' | 'challenger' | 'settings'>, r: PendingRow, v: VelocitySnapshot): ScoreOutcome {
  const amount = r.amount_minor / 10 ** r.currency_exponent;
  const features = featureRow(
    {
      amount,
      mcc: r.mcc,
      mccHighRisk: isHighRiskMcc(r.mcc),
      merchantCountry: r.merchant_country,
      cardPresent: Boolean(r.card_present),
      channel: r.channel,
      occurredAt: new Date(r.occurred_at),
    },
    v,
  );
  const s = scoreRowWith(ctx.champion, features);
  const ch = ctx.challenger;
  let shadow: ScoreOutcome['shadow'] = null;
  if (ch) {
    const margin = ch.compiled.score(features);
    const probability = ch.compiled.probability(margin);
    shadow = { modelVersionId: ch.id, margin, probability, wouldAlert: probability >= ctx.settings.threshold };
  }
  return {
    transactionId: Number(r.id),
    externalId: r.external_id,
    ...s,
    features,
    alerted: s.probability >= ctx.settings.threshold,
    modelVersionId: ctx.champion.id,
    threshold: ctx.settings.threshold,
    shadow,
  };
}

/**
 * Opens a case for the card or joins its open one. The unique `open_card_id`
 * makes "one open case per card" hold under concurrency: the insert either
 * creates the case or updates the open one, and LAST_INSERT_ID(id) returns its
 * id either way.
 */
async function raiseAlert(db: Database, t: Transaction, { o, r, settings }: ScoredRow): Promise<DomainEvent> {
  const priority = priorityFor(o.probability, settings);
  const occurred = new Date(r.occurred_at);
  const due = new Date(Date.now() + settings.slaMinutes[priority] * 60_000);
  const [insertId, affected] = (await db.sequelize.query(
    `INSERT INTO cases (card_id, open_card_id, status, priority, highest_probability, highest_margin, amount_at_risk_minor, currency,
        currency_exponent, alert_count, first_alert_at, last_alert_at, sla_due_at, mcc, merchant_country, channel, created_at, updated_at)
     VALUES (:card, :card, 'new', :priority, :p, :margin, :amount, :currency, :exp, 1, :occurred, :occurred, :due, :mcc, :country, :channel, UTC_TIMESTAMP(3), UTC_TIMESTAMP(3))
     ON DUPLICATE KEY UPDATE
        id = LAST_INSERT_ID(id),
        alert_count = alert_count + 1,
        priority = IF(VALUES(priority) + 0 > priority + 0, VALUES(priority), priority),
        sla_due_at = LEAST(sla_due_at, VALUES(sla_due_at)),
        highest_probability = GREATEST(highest_probability, VALUES(highest_probability)),
        highest_margin = GREATEST(highest_margin, VALUES(highest_margin)),
        amount_at_risk_minor = amount_at_risk_minor + IF(currency = VALUES(currency), VALUES(amount_at_risk_minor), 0),
        last_alert_at = GREATEST(last_alert_at, VALUES(last_alert_at)),
        first_alert_at = LEAST(first_alert_at, VALUES(first_alert_at)),
        version = version + 1,
        updated_at = UTC_TIMESTAMP(3)`,
    {
      replacements: {
        card: r.card_id,
        priority,
        p: o.probability,
        margin: o.normalizedMargin,
        amount: r.amount_minor,
        currency: r.currency,
        exp: r.currency_exponent,
        occurred,
        due,
        mcc: r.mcc,
        country: r.merchant_country,
        channel: r.channel,
      },
      type: QueryTypes.INSERT,
      transaction: t,
    },
  )) as unknown as [number, number];
  const caseId = Number(insertId);
  // A case this insert opened (not one it joined) goes through the routing rules once.
  if (affected === 1) {
    await routeNewCase(db, t, caseId, {
      amountAtRiskMinor: Number(r.amount_minor),
      currencyExponent: Number(r.currency_exponent),
      mcc: r.mcc,
      merchantCountry: r.merchant_country,
      channel: r.channel,
    });
  }
  await db.sequelize.query('INSERT IGNORE INTO alerts (transaction_id, case_id, probability, created_at) VALUES (?, ?, ?, UTC_TIMESTAMP(3))', {
    replacements: [o.transactionId, caseId, o.probability],
    type: QueryTypes.INSERT,
    transaction: t,
  });
  const [c] = await db.sequelize.query<{ status: string; assignee_id: number | null; team_id: number | null }>('SELECT status, assignee_id, team_id FROM cases WHERE id = ?', {
    replacements: [caseId],
    type: QueryTypes.SELECT,
    transaction: t,
  });
  return {
    type: 'case.alerted',
    caseId,
    // MariaDB reports 1 affected row for an insert and 2 for the update branch of ON DUPLICATE KEY.
    created: affected === 1,
    transactionId: o.transactionId,
    externalId: o.externalId,
    probability: o.probability,
    status: c?.status ?? 'new',
    assigneeId: c?.assignee_id == null ? null : Number(c.assignee_id),
    teamId: c?.team_id == null ? null : Number(c.team_id),
    at: new Date().toISOString(),
  };
}

/** Multi-row INSERT in chunks (one round trip per 500 rows). */
async function bulkInsert(t: Transaction, head: string, rows: unknown[][]): Promise<void> {
  for (let i = 0; i < rows.length; i += 500) {
    const { sql, values } = bindRows(rows.slice(i, i + 500));
    await rawQuery(t, `${head} ${sql}`, values);
  }
}
