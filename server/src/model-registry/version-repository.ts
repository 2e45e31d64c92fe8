import { QueryTypes, type Transaction } from 'sequelize';
import type { Database } from '../db/database';
import type { Curves, Evaluation, Headline, ModelRole, ModelVersionDetail, ModelVersionSummary, RoundRow } from '@shared/api/models';
import { featureImportance, formatNumber, parseModel, stepFunctions, type Model, type RoundTrace } from '@shared/model/index';
import type { DriftBaseline } from '../drift/baseline';

/**
 * Reads of the model registry for the Models screen, and the role changes a
 * promotion, a rollback or a new challenger make. Plain objects out.
 */

interface SummaryRow {
  id: number;
  label: string;
  role: ModelRole;
  created_at: Date;
  promoted_at: Date | null;
  created_by: number | null;
  creator_name: string | null;
  data_from: Date | null;
  data_to: Date | null;
  train_rows: number | null;
  notes: string | null;
  roc: string | null;
  ap: string | null;
  brier: string | null;
  budget_precision: string | null;
  budget_recall: string | null;
  counts: string | object | null;
  training_ms: string | null;
  rounds: string | null;
}

const num = (v: string | number | null | undefined): number | null => {
  if (v === null || v === undefined || v === 'null') return null;
  const x = Number(v);
  return Number.isFinite(x) ? x : null;
};
const iso = (d: Date | string | null) => (d ? new Date(d).toISOString() : null);

const SUMMARY_SELECT = `
  SELECT v.id, v.label, v.role, v.created_at, v.promoted_at, v.created_by, u.display_name AS creator_name,
         v.data_from, v.data_to, v.train_rows, v.notes,
         JSON_EXTRACT(v.metrics, '$.evaluation.rocAuc') AS roc,
         JSON_EXTRACT(v.metrics, '$.evaluation.averagePrecision') AS ap,
         JSON_EXTRACT(v.metrics, '$.evaluation.brier') AS brier,
         JSON_EXTRACT(v.metrics, '$.evaluation.alertBudget.precision') AS budget_precision,
         JSON_EXTRACT(v.metrics, '$.evaluation.alertBudget.recall') AS budget_recall,
         JSON_EXTRACT(v.metrics, '$.counts') AS counts,
         JSON_EXTRACT(v.metrics, '$.timing.trainingMs') AS training_ms,
         JSON_EXTRACT(v.model_json, '$.training.bestRound') AS rounds
  FROM model_versions v LEFT JOIN users u ON u.id = v.created_by`;

function toSummary(r: SummaryRow): ModelVersionSummary {
  const headline: Headline = {
    rocAuc: num(r.roc),
    averagePrecision: num(r.ap),
    brier: num(r.brier),
    precisionAtBudget: num(r.budget_precision),
    recallAtBudget: num(r.budget_recall),
  };
  const ms = num(r.training_ms);
  return {
    id: Number(r.id),
    label: r.label,
    role: r.role,
    createdAt: iso(r.created_at)!,
    promotedAt: iso(r.promoted_at),
    createdBy: r.created_by ? { id: Number(r.created_by), displayName: r.creator_name ?? `user ${r.created_by}` } : null,
    dataFrom: iso(r.data_from),
    dataTo: iso(r.data_to),
    trainRows: num(r.train_rows),
    // The driver hands JSON_EXTRACT objects back parsed or as text, depending on the server's column type.
    counts: r.counts ? ((typeof r.counts === 'string' ? JSON.parse(r.counts) : r.counts) as ModelVersionSummary['counts']) : null,
    headline,
    trainingSeconds: ms === null ? null : ms / 1000,
    rounds: num(r.rounds) ?? 0,
    notes: r.notes,
  };
}

/** Every version, newest first. */
export async function listVersions(db: Database): Promise<ModelVersionSummary[]> {
  const rows = await db.sequelize.query<SummaryRow>(`${SUMMARY_SELECT} ORDER BY v.id DESC`, { type: QueryTypes.SELECT });
  return rows.map(toSummary);
}

export async function findVersionSummary(db: Database, id: number): Promise<ModelVersionSummary | null> {
  const [row] = await db.sequelize.query<SummaryRow>(`${SUMMARY_SELECT} WHERE v.id = ?`, { replacements: [id], type: QueryTypes.SELECT });
  return row ? toSummary(row) : null;
}

/** What training stored in `metrics` (every part optional: older versions lack the newer ones). */
export interface StoredMetrics {
  evaluation?: Evaluation;
  counts?: ModelVersionSummary['counts'];
  trace?: RoundTrace[];
  calibration?: { a: number; b: number; n: number; positives: number };
  windows?: ModelVersionDetail['windows'];
  curves?: Curves;
  baseline?: DriftBaseline;
  timing?: { trainingMs: number; totalMs: number };
}

export interface VersionRecord {
  summary: ModelVersionSummary;
  model: Model;
  params: Record<string, unknown> | null;
  metrics: StoredMetrics;
}

export async function findVersion(db: Database, id: number): Promise<VersionRecord | null> {
  const summary = await findVersionSummary(db, id);
  if (!summary) return null;
  const [row] = await db.sequelize.query<{ model_json: string; params: string | null; metrics: string | null }>(
    'SELECT model_json, params, metrics FROM model_versions WHERE id = ?',
    { replacements: [id], type: QueryTypes.SELECT },
  );
  return {
    summary,
    model: parseModel(row.model_json),
    params: row.params ? (JSON.parse(row.params) as Record<string, unknown>) : null,
    metrics: row.metrics ? (JSON.parse(row.metrics) as StoredMetrics) : {},
  };
}

/** The readable rule of a round's stump: its right side (where h = s). */
export function roundRule(t: Pick<RoundTrace, 'feature' | 'kind' | 'threshold' | 'category' | 'match' | 'missingRight'>): string {
  if (t.kind === 'numeric') {
    if (t.threshold === null) return `${t.feature} missing`;
    return `${t.feature} > ${formatNumber(t.threshold)}${t.missingRight ? ' or missing' : ''}`;
  }
  if (t.match === 'category') return `${t.feature} = ${t.category}`;
  if (t.match === 'other') return `${t.feature} = (other)`;
  return `${t.feature} missing`;
}

/** The whole page of one version: evaluation, curves, round table, importance and step functions. */
export function versionDetail(r: VersionRecord): ModelVersionDetail {
  const { model, metrics } = r;
  const best = model.training.bestRound;
  const roundTable: RoundRow[] = (metrics.trace ?? []).map((t) => ({
    round: t.round,
    feature: t.feature,
    kind: t.kind,
    rule: roundRule(t),
    threshold: t.threshold,
    category: t.category,
    polarity: t.polarity,
    edge: t.edge,
    weightedError: t.weightedError,
    alpha: t.alpha,
    trainLoss: t.trainLoss,
    validationLoss: t.validationLoss,
    kept: t.round <= best,
  }));
  const c = model.calibration;
  return {
    ...r.summary,
    params: r.params,
    evaluation: metrics.evaluation ?? null,
    curves: metrics.curves ?? null,
    roundTable,
    importance: featureImportance(model),
    stepFunctions: stepFunctions(model),
    calibration: c ? { a: c.a, b: c.b, n: c.n, positives: c.positives } : null,
    windows: metrics.windows ?? null,
    training: {
      roundsRun: model.training.roundsRun,
      bestRound: model.training.bestRound,
      stoppedBy: model.training.stoppedBy,
      nTrain: model.training.nTrain,
      nTrainPositive: model.training.nTrainPositive,
      nValidation: model.training.nValidation,
      nValidationPositive: model.training.nValidationPositive,
      shrinkage: model.training.options.shrinkage,
      maxRounds: model.training.options.rounds,
    },
    features: model.features.map((f) => ({ name: f.name, kind: f.kind })),
    hasDriftBaseline: Boolean(metrics.baseline),
  };
}

export async function activeVersionIds(db: Database, t?: Transaction): Promise<{ champion: number | null; challenger: number | null }> {
  const rows = await db.sequelize.query<{ id: number; role: ModelRole }>(
    "SELECT id, role FROM model_versions WHERE role IN ('champion', 'challenger') ORDER BY id DESC",
    { type: QueryTypes.SELECT, transaction: t },
  );
  const champion = rows.find((x) => x.role === 'champion');
  const challenger = rows.find((x) => x.role === 'challenger');
  return { champion: champion ? Number(champion.id) : null, challenger: challenger ? Number(challenger.id) : null };
}

/** Makes a version the challenger (it scores in shadow); the previous challenger goes back to candidate. */
export async function makeChallenger(db: Database, id: number): Promise<void> {
  await db.sequelize.transaction(async (t) => {
    await db.sequelize.query("UPDATE model_versions SET role = 'candidate', updated_at = UTC_TIMESTAMP(3) WHERE role = 'challenger' AND id <> ?", {
      replacements: [id],
      type: QueryTypes.UPDATE,
      transaction: t,
    });
    await db.sequelize.query("UPDATE model_versions SET role = 'challenger', updated_at = UTC_TIMESTAMP(3) WHERE id = ? AND role <> 'champion'", {
      replacements: [id],
      type: QueryTypes.UPDATE,
      transaction: t,
    });
  });
}

/**
 * Inside the caller's transaction: the champion retires and `id` becomes
 * champion (from challenger, candidate or retired). Rows are locked first, so
 * two approvals at once apply one after the other.
 */
export async function swapChampion(db: Database, t: Transaction, id: number): Promise<{ previous: number | null }> {
  const rows = await db.sequelize.query<{ id: number; role: ModelRole }>(
    "SELECT id, role FROM model_versions WHERE role = 'champion' OR id = ? FOR UPDATE",
    { replacements: [id], type: QueryTypes.SELECT, transaction: t },
  );
  const previous = rows.find((r) => r.role === 'champion' && Number(r.id) !== id);
  await db.sequelize.query("UPDATE model_versions SET role = 'retired', updated_at = UTC_TIMESTAMP(3) WHERE role = 'champion' AND id <> ?", {
    replacements: [id],
    type: QueryTypes.UPDATE,
    transaction: t,
  });
  await db.sequelize.query("UPDATE model_versions SET role = 'champion', promoted_at = UTC_TIMESTAMP(3), updated_at = UTC_TIMESTAMP(3) WHERE id = ?", {
    replacements: [id],
    type: QueryTypes.UPDATE,
    transaction: t,
  });
  return { previous: previous ? Number(previous.id) : null };
}
