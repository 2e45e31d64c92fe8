import type { Redis } from 'ioredis';
import { QueryTypes } from 'sequelize';
import type { Database } from '../db/database';
import type { Config } from '../config/index';
import { validateTransaction } from '@shared/api/transactions';
import { normaliseTransaction } from '../ingest/normalise-transaction';
import { storeHistoricalBatch, type HistoricalItem } from '../backfill/store-historical';
import { VelocityStore } from '../scoring/velocity';
import { trainModelVersion } from '../training/train-model-version';
import { appendAudit } from '../audit/audit-repository';
import { createDemoWorld, DEMO_SEED, toIngestPayload, type SimulatedTransaction } from './simulator/index';
import { demoCardholderEmail } from './demo-directory';
import { buildHistoryThresholdCurve } from '../settings/threshold-curve';
import { readAlertingSettings, writeAlertingSettings } from '../settings/settings-repository';
import { readSupervisionSettings, writeSupervisionSettings } from '../settings/supervision-settings';
import { thresholdForCapacity } from '@shared/api/supervision';

/** The history seed and the live feed share one world (same cardholders and cards), with different id prefixes. */
export const DEMO_WORLD_SEED = DEMO_SEED;

export interface HistoryOptions {
  days: number;
  cardholders: number;
  /** Days a chargeback may take to arrive; the first model trains on rows older than this. */
  labelDelayDays: number;
  /**
   * Cases a day the demo team can work. After training, the alert threshold is
   * set from the first champion's capacity curve on the last 14 days of the
   * history, the way a supervisor sets it. Absent or null leaves the threshold alone.
   */
  dailyCapacity?: number | null;
  log?: (line: string) => void;
}

/**
 * Back-fills the invented issuer's history the way production back-fill
 * works: each transaction validated and tokenised like an ingest, stored as
 * historical, its features computed in time order through the same velocity
 * state the live scorer uses, and its label recorded when it would have been
 * known (chargebacks weeks later; only some legitimate ones confirmed). Then
 * the first champion is trained on it, so the demo scores from its first
 * minute. Runs once: a database that already has seeded history is left alone.
 */
export async function seedDemoHistory(db: Database, redis: Redis, c: Config, o: HistoryOptions): Promise<{ rows: number; modelVersionId: number | null }> {
  const [{ n }] = await db.sequelize.query<{ n: number }>("SELECT COUNT(*) AS n FROM transactions WHERE source = 'seed'", { type: QueryTypes.SELECT });
  if (Number(n) > 0) return { rows: 0, modelVersionId: null };
  const log = o.log ?? (() => undefined);
  const now = new Date();
  const to = new Date(now.getTime() - 10 * 60_000);
  const from = new Date(to.getTime() - o.days * 86_400_000);
  const world = createDemoWorld({ seed: DEMO_WORLD_SEED, cardholders: o.cardholders });
  const velocity = new VelocityStore(redis, c.REDIS_PREFIX);

  // The issuer's customer records: names and (invented) e-mail addresses for cardholder contact.
  const holders = world.cardholders;
  for (let i = 0; i < holders.length; i += 1000) {
    const part = holders.slice(i, i + 1000);
    await db.sequelize.query(
      `INSERT IGNORE INTO cardholders (ref, display_name, email, created_at, updated_at) VALUES ${part.map(() => '(?, ?, ?, ?, ?)').join(', ')}`,
      {
        replacements: part.flatMap((h) => [h.id, h.name, demoCardholderEmail(h.name, h.index), now, now]),
        type: QueryTypes.INSERT,
      },
    );
  }

  let rows = 0;
  let chunk: SimulatedTransaction[] = [];
  const flush = async () => {
    if (chunk.length === 0) return;
    const items: HistoricalItem[] = chunk.flatMap((s) => {
      const v = validateTransaction(toIngestPayload(s), { now });
      if (!v.ok) return [];
      const t = normaliseTransaction(v.value, c.PAN_HMAC_KEY);
      const truth = s.truth;
      const reportedAt = truth.labelReportedAt ?? null;
      // A label exists only once it would have been known: chargebacks weeks later, some legitimate ones confirmed.
      const label =
        truth.fraud && reportedAt && reportedAt <= now
          ? { label: 'fraud' as const, fraudType: truth.fraudType ?? null, reportedAt }
          : !truth.fraud && truth.wouldBeLabelled
            ? { label: 'legitimate' as const, fraudType: null, reportedAt: reportedAt && reportedAt <= now ? reportedAt : t.occurredAt }
            : null;
      return [{ t, label }];
    });
    const outcomes = await storeHistoricalBatch(db, velocity, items, { source: 'seed', labelSource: 'seed', receivedAt: now, createdBy: null, labelExisting: false });
    rows += outcomes.filter((o) => o.status === 'accepted').length;
    chunk = [];
  };

  for (const s of world.history({ from, to })) {
    chunk.push(s);
    if (chunk.length >= 1000) {
      await flush();
      if (rows % 50_000 < 1000) log(`history: ${rows} transactions`);
    }
  }
  await flush();
  log(`history: ${rows} transactions from ${from.toISOString().slice(0, 10)} to ${to.toISOString().slice(0, 10)}; training the first champion`);

  const outcome = await trainModelVersion(db, {
    label: 'v1',
    role: 'champion',
    from,
    to,
    labelsAsOf: now,
    labelDelayDays: o.labelDelayDays,
    notes: 'First champion, trained on the seeded demo history at first start.',
  });
  await appendAudit(db, {
    actorType: 'system',
    actorLabel: 'demo seed',
    action: 'model.register',
    targetType: 'model_version',
    targetId: outcome.modelVersionId,
    outcome: 'success',
    details: { role: 'champion', rows: outcome.counts.rows, testRocAuc: outcome.evaluation.rocAuc },
  });
  log(`first champion v1: ${outcome.counts.train} training rows, held-out ROC AUC ${outcome.evaluation.rocAuc.toFixed(3)}`);
  const capacity = o.dailyCapacity ?? null;
  if (capacity !== null) {
    const set = await thresholdFromHistory(db, { from: new Date(to.getTime() - HISTORY_CURVE_DAYS * 86_400_000), to }, capacity);
    log(
      set
        ? `alert threshold ${set.threshold.toFixed(2)} for ${capacity} cases a day (about ${set.casesPerDay.toFixed(1)} cases a day on the last ${HISTORY_CURVE_DAYS} days of history)`
        : `alert threshold left as it was: even the highest threshold opens more than ${capacity} cases a day`,
    );
  }
  return { rows, modelVersionId: outcome.modelVersionId };
}

const HISTORY_CURVE_DAYS = 14;

/**
 * Sets the alert threshold (and the capacity it came from) from the champion's
 * curve on stored history: the lowest threshold whose cases a day fit the
 * capacity. Audited as the demo seed's change. Null when no threshold fits.
 */
async function thresholdFromHistory(db: Database, window: { from: Date; to: Date }, dailyCapacity: number) {
  const before = await readAlertingSettings(db);
  const curve = await buildHistoryThresholdCurve(db, window, before.threshold);
  const point = thresholdForCapacity(curve.points, dailyCapacity);
  if (!point) return null;
  const after = { ...before, threshold: point.threshold };
  const supervision = await readSupervisionSettings(db);
  await writeSupervisionSettings(db, { ...supervision, dailyCapacity }, null);
  await writeAlertingSettings(db, after, null);
  await appendAudit(db, {
    actorType: 'system',
    actorLabel: 'demo seed',
    action: 'settings.threshold',
    targetType: 'settings',
    targetId: 'alerting',
    outcome: 'success',
    details: {
      before,
      after,
      dailyCapacity,
      expected: { casesPerDay: point.casesPerDay, alertsPerDay: point.alertsPerDay, precision: point.precision, recall: point.recall },
      traffic: curve.traffic,
    },
  });
  return point;
}
