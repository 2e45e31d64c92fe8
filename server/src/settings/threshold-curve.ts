import { QueryTypes } from 'sequelize';
import type { Database } from '../db/database';
import type { PrecisionSource, ThresholdCurve, ThresholdPoint } from '@shared/api/supervision';
import type { Row } from '@shared/model/index';
import { loadActiveModels } from '../model-registry/model-repository';

/** Thresholds the curve is computed at: 0.01, 0.02, ..., 0.99. */
export const GRID = Array.from({ length: 99 }, (_, i) => (i + 1) / 100);

/**
 * Scores are bucketed by FLOOR(p * 100 + 1e-9): the small tolerance puts a
 * probability stored as 0.28999999999999998 (the double nearest 0.29) in
 * bucket 29, so "bucket >= k" agrees with the scorer's `p >= k / 100`.
 */
const BUCKET_SQL = (col: string) => `LEAST(99, FLOOR(${col} * 100 + 1e-9))`;

/** counts[k] = rows in bucket k (k = 0..99) → rows at or above each grid threshold. */
export function atOrAbove(buckets: Map<number, number>): number[] {
  const out = new Array<number>(GRID.length).fill(0);
  let running = 0;
  for (let k = 99; k >= 1; k -= 1) {
    running += buckets.get(k) ?? 0;
    out[k - 1] = running;
  }
  return out;
}

export interface ClassHistogram {
  edges: number[];
  fraud: number[];
  legitimate: number[];
}

/**
 * Rows at or above threshold t from a histogram whose bin i covers
 * [edges[i], edges[i+1]): whole bins above t, and the part of t's bin above
 * it in proportion to its width (rows assumed spread evenly inside a bin).
 * Exact when t is a bin edge.
 */
export function histogramAtOrAbove(edges: number[], counts: number[], t: number): number {
  let n = 0;
  for (let i = 0; i < counts.length; i += 1) {
    const lo = edges[i];
    const hi = edges[i + 1];
    if (lo >= t - 1e-12) n += counts[i];
    else if (hi > t) n += (counts[i] * (hi - t)) / (hi - lo);
  }
  return n;
}

/** Precision = TP / (TP + FP) and recall = TP / all fraud at each threshold; null where undefined (no alerts, no fraud). */
export function precisionRecall(tp: number[], fp: number[], totalFraud: number): { precision: number | null; recall: number | null }[] {
  return tp.map((a, i) => ({
    precision: a + fp[i] > 0 ? a / (a + fp[i]) : null,
    recall: totalFraud > 0 ? a / totalFraud : null,
  }));
}

export function precisionRecallFromHistogram(h: ClassHistogram) {
  const tp = GRID.map((t) => histogramAtOrAbove(h.edges, h.fraud, t));
  const fp = GRID.map((t) => histogramAtOrAbove(h.edges, h.legitimate, t));
  return precisionRecall(tp, fp, h.fraud.reduce((s, x) => s + x, 0));
}

function isHistogram(v: unknown): v is ClassHistogram {
  const h = v as ClassHistogram | undefined;
  return (
    !!h &&
    Array.isArray(h.edges) &&
    Array.isArray(h.fraud) &&
    Array.isArray(h.legitimate) &&
    h.edges.length === h.fraud.length + 1 &&
    h.fraud.length === h.legitimate.length &&
    h.fraud.reduce((s, x) => s + x, 0) > 0
  );
}

const toBuckets = (rows: { b: number; n: number }[]) => new Map(rows.map((r) => [Number(r.b), Number(r.n)]));

/** The bucket of a probability, as BUCKET_SQL computes it in the database. */
const bucketOf = (p: number) => Math.min(99, Math.floor(p * 100 + 1e-9));

function curvePoints(alerts: number[], cases: number[], spanDays: number, pr: { precision: number | null; recall: number | null }[]): ThresholdPoint[] {
  return GRID.map((threshold, i) => ({
    threshold,
    alertsPerDay: alerts[i] / spanDays,
    casesPerDay: cases[i] / spanDays,
    precision: pr[i].precision,
    recall: pr[i].recall,
  }));
}

interface ChampionRow {
  id: number;
  label: string;
  metrics: string | null;
}

async function readChampion(db: Database): Promise<ChampionRow | undefined> {
  const [champion] = await db.sequelize.query<ChampionRow>("SELECT id, label, metrics FROM model_versions WHERE role = 'champion' ORDER BY id DESC LIMIT 1", {
    type: QueryTypes.SELECT,
  });
  return champion;
}

/**
 * Precision and recall at each grid threshold: from the champion's held-out
 * probability histogram when it is stored, else from labelled transactions
 * the champion scored live.
 */
async function championPrecision(db: Database, champion: ChampionRow | undefined) {
  let precisionSource: PrecisionSource = 'none';
  let pr: { precision: number | null; recall: number | null }[] = GRID.map(() => ({ precision: null, recall: null }));
  let precisionNote = 'No champion evaluation and no labelled scored transactions: precision and recall are unknown.';
  const metrics = champion?.metrics ? (JSON.parse(champion.metrics) as { evaluation?: { probabilityHistogram?: unknown; n?: number; fraud?: number } }) : null;
  const hist = metrics?.evaluation?.probabilityHistogram;
  if (isHistogram(hist)) {
    precisionSource = 'holdout_histogram';
    pr = precisionRecallFromHistogram(hist);
    const total = hist.fraud.reduce((s, x) => s + x, 0) + hist.legitimate.reduce((s, x) => s + x, 0);
    const width = hist.edges[1] - hist.edges[0];
    precisionNote =
      `From the champion's held-out test rows (${total.toLocaleString('en')} transactions, ${hist.fraud.reduce((s, x) => s + x, 0)} fraud): ` +
      `exact at steps of ${width.toFixed(2)}, interpolated between them. Held-out rows have the fraud rate of the training period; today's may differ.`;
  } else if (champion) {
    const rows = await db.sequelize.query<{ b: number; label: 'fraud' | 'legitimate'; n: number }>(
      `SELECT ${BUCKET_SQL('s.probability')} AS b, l.label, COUNT(*) AS n
       FROM transaction_scores s
       JOIN (SELECT transaction_id, MAX(id) AS id FROM labels GROUP BY transaction_id) last ON last.transaction_id = s.transaction_id
       JOIN labels l ON l.id = last.id
       WHERE s.model_version_id = ?
       GROUP BY b, l.label`,
      { replacements: [champion.id], type: QueryTypes.SELECT },
    );
    const fraud = toBuckets(rows.filter((r) => r.label === 'fraud'));
    const legit = toBuckets(rows.filter((r) => r.label === 'legitimate'));
    const totalFraud = [...fraud.values()].reduce((s, x) => s + x, 0);
    if (rows.length > 0 && totalFraud > 0) {
      precisionSource = 'labelled_scores';
      // Bucket 0 holds fraud below every grid threshold: it counts toward recall's denominator.
      pr = precisionRecall(atOrAbove(fraud), atOrAbove(legit), totalFraud);
      const labelled = rows.reduce((s, r) => s + Number(r.n), 0);
      precisionNote =
        `The champion's evaluation holds no score histogram, so these come from ${labelled.toLocaleString('en')} labelled transactions it scored live (${totalFraud} fraud). ` +
        'Labels come mostly from alerted cases, so recall is likely overstated.';
    }
  }

  return { precisionSource, pr, precisionNote };
}

/**
 * The threshold curve for the supervisor: from recent traffic (scored
 * transactions of the last `days` days), alerts and cases per day at each
 * threshold; from the champion's held-out evaluation (its stored probability
 * histogram by class), precision and recall there. A champion without that
 * histogram falls back to labelled scored transactions in the database.
 */
export async function buildThresholdCurve(db: Database, days: number, currentThreshold: number): Promise<ThresholdCurve> {
  const now = new Date();
  const windowStart = new Date(now.getTime() - days * 86_400_000);
  const champion = await readChampion(db);

  // Traffic: the champion's own scores when it has enough of them, else every model's.
  const [{ n: championScored, first: championFirst }] = champion
    ? await db.sequelize.query<{ n: number; first: Date | null }>(
        'SELECT COUNT(*) AS n, MIN(scored_at) AS first FROM transaction_scores WHERE scored_at >= ? AND model_version_id = ?',
        { replacements: [windowStart, champion.id], type: QueryTypes.SELECT },
      )
    : [{ n: 0, first: null }];
  const championOnly = Number(championScored) >= 100;
  const modelFilter = championOnly ? 'AND s.model_version_id = :model' : '';
  const rep = { from: windowStart, model: champion?.id ?? 0 };
  const [{ n: scored, first }] = championOnly
    ? [{ n: championScored, first: championFirst }]
    : await db.sequelize.query<{ n: number; first: Date | null }>(
        'SELECT COUNT(*) AS n, MIN(scored_at) AS first FROM transaction_scores WHERE scored_at >= ?',
        { replacements: [windowStart], type: QueryTypes.SELECT },
      );
  const from = first ? new Date(first) : now;
  // Per day over the span the window actually covers (a young database has less than `days`), at least one hour.
  const spanDays = Math.max((now.getTime() - from.getTime()) / 86_400_000, 1 / 24);

  const [alertRows, caseRows] = await Promise.all([
    db.sequelize.query<{ b: number; n: number }>(
      `SELECT ${BUCKET_SQL('s.probability')} AS b, COUNT(*) AS n FROM transaction_scores s WHERE s.scored_at >= :from ${modelFilter} GROUP BY b`,
      { replacements: rep, type: QueryTypes.SELECT },
    ),
    // One case per card and day at most: the card's highest score of the day decides whether it opens one.
    db.sequelize.query<{ b: number; n: number }>(
      `SELECT ${BUCKET_SQL('x.maxp')} AS b, COUNT(*) AS n FROM (
         SELECT t.card_id, DATE(s.scored_at) AS d, MAX(s.probability) AS maxp
         FROM transaction_scores s JOIN transactions t ON t.id = s.transaction_id
         WHERE s.scored_at >= :from ${modelFilter}
         GROUP BY t.card_id, d) x
       GROUP BY b`,
      { replacements: rep, type: QueryTypes.SELECT },
    ),
  ]);
  const alerts = atOrAbove(toBuckets(alertRows));
  const cases = atOrAbove(toBuckets(caseRows));

  const { precisionSource, pr, precisionNote } = await championPrecision(db, champion);
  return {
    points: curvePoints(alerts, cases, spanDays, pr),
    current: currentThreshold,
    traffic: { days: spanDays, from: from.toISOString(), to: now.toISOString(), scored: Number(scored) },
    precisionSource,
    precisionNote,
    champion: champion ? { id: Number(champion.id), label: champion.label } : null,
  };
}

/**
 * The threshold curve of a newly trained champion on stored history: before
 * any live traffic is scored (a first start after a back-fill), alerts and
 * cases per day come from the champion's scores of the stored features of
 * transactions that occurred in [from, to), counted per day of that span;
 * precision and recall as in the live curve. A case is counted once per card
 * and UTC day, its highest score deciding.
 */
export async function buildHistoryThresholdCurve(db: Database, window: { from: Date; to: Date }, currentThreshold: number): Promise<ThresholdCurve> {
  const [champion, { champion: loaded }] = await Promise.all([readChampion(db), loadActiveModels(db)]);
  const alertBuckets = new Map<number, number>();
  const cardDays = new Map<string, number>();
  let scored = 0;
  if (loaded) {
    const { compiled } = loaded;
    const rows = await db.sequelize.query<{ card_id: number; occurred_at: Date; features: string }>(
      `SELECT t.card_id, t.occurred_at, f.features FROM transactions t JOIN transaction_features f ON f.transaction_id = t.id
       WHERE t.occurred_at >= ? AND t.occurred_at < ?`,
      { replacements: [window.from, window.to], type: QueryTypes.SELECT },
    );
    for (const r of rows) {
      const b = bucketOf(compiled.probability(compiled.score(JSON.parse(r.features) as Row)));
      alertBuckets.set(b, (alertBuckets.get(b) ?? 0) + 1);
      const key = `${r.card_id}:${new Date(r.occurred_at).toISOString().slice(0, 10)}`;
      cardDays.set(key, Math.max(cardDays.get(key) ?? 0, b));
    }
    scored = rows.length;
  }
  const caseBuckets = new Map<number, number>();
  for (const b of cardDays.values()) caseBuckets.set(b, (caseBuckets.get(b) ?? 0) + 1);
  const spanDays = Math.max((window.to.getTime() - window.from.getTime()) / 86_400_000, 1 / 24);
  const { precisionSource, pr, precisionNote } = await championPrecision(db, champion);
  return {
    points: curvePoints(atOrAbove(alertBuckets), atOrAbove(caseBuckets), spanDays, pr),
    current: currentThreshold,
    traffic: { days: spanDays, from: window.from.toISOString(), to: window.to.toISOString(), scored },
    precisionSource,
    precisionNote,
    champion: champion ? { id: Number(champion.id), label: champion.label } : null,
  };
}
