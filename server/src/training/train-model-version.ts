import type { Database } from '../db/database';
import { FEATURES } from '@shared/features/definitions';
import {
  calibratePlatt,
  compileModel,
  evaluate,
  featureImportance,
  trainModel,
  TrainingError,
  withCalibration,
  type EvaluationReport,
  type Model,
  type RoundTrace,
  type TrainHooks,
  type TrainingData,
  type TrainOptionsInput,
  type TrainResult,
} from '@shared/model/index';
import { buildDataset, sliceSet, type Dataset, type DatasetWindow } from './build-dataset';
import { insertModelVersion, type ModelRole } from '../model-registry/model-repository';
import { rocPrCurves } from './evaluation-curves';
import { buildDriftBaseline } from '../drift/baseline';

/** Runs the boosting; the default is `trainModel` in this thread (the training worker runs it in a worker thread). */
export type Trainer = (data: TrainingData, options: TrainOptionsInput, hooks: TrainHooks) => TrainResult | Promise<TrainResult>;

/** The run was cancelled through its AbortSignal; nothing was registered. */
export class TrainingCancelled extends Error {
  constructor() {
    super('The training run was cancelled.');
    this.name = 'TrainingCancelled';
  }
}

/** Fewest fraud rows the validation part must hold for Platt scaling to mean anything (common practice: a handful at least). */
export const MIN_CALIBRATION_POSITIVES = 5;

export interface TrainingRequest extends DatasetWindow {
  label: string;
  role: ModelRole;
  options?: TrainOptionsInput;
  /** Share of the newest rows held out: half for early stopping and calibration, half for evaluation. */
  holdoutShare?: number;
  /** The team's daily alert budget, for precision/recall at the budget. */
  dailyBudget?: number;
  createdBy?: number | null;
  notes?: string;
  onRound?: (t: RoundTrace, total: number) => void;
  /** What the run is doing now, for progress displays. */
  onPhase?: (phase: string) => void;
  /** Aborting stops boosting after the current round; the run then throws TrainingCancelled and registers nothing. */
  signal?: AbortSignal;
  trainer?: Trainer;
}

export interface TrainingOutcome {
  modelVersionId: number;
  model: Model;
  trace: RoundTrace[];
  evaluation: EvaluationReport;
  counts: Dataset['counts'] & { train: number; validation: number; test: number };
}

function scoreSet(model: Model, d: Dataset) {
  const compiled = compileModel(model);
  const margin = compiled.scoreColumns(d.set.columns);
  const probability = new Float64Array(margin.length);
  const normalizedMargin = new Float64Array(margin.length);
  for (let i = 0; i < margin.length; i += 1) {
    probability[i] = compiled.probability(margin[i]);
    normalizedMargin[i] = compiled.totalAlpha > 0 ? margin[i] / compiled.totalAlpha : 0;
  }
  return { margin, probability, normalizedMargin };
}

/**
 * One training run: a time-ordered split (train on the older rows; the newer
 * held-out rows split again into a validation part for early stopping and
 * Platt calibration and a test part for the evaluation), boosting with the
 * engine, calibration, evaluation, and registration of the version.
 */
export async function trainModelVersion(db: Database, req: TrainingRequest): Promise<TrainingOutcome> {
  const startedAt = Date.now();
  const cancelled = () => {
    if (req.signal?.aborted) throw new TrainingCancelled();
  };
  req.onPhase?.('reading labelled transactions');
  const data = await buildDataset(db, req);
  cancelled();
  const n = data.counts.rows;
  const hold = req.holdoutShare ?? 0.3;
  const trainEnd = Math.floor(n * (1 - hold));
  const validEnd = Math.floor(n * (1 - hold / 2));
  const train = sliceSet(data, 0, trainEnd);
  const valid = sliceSet(data, trainEnd, validEnd);
  const test = sliceSet(data, validEnd, n);
  if (test.counts.rows === 0 || valid.counts.rows === 0 || train.counts.rows === 0) {
    throw new TrainingError('bad-data', `The window holds ${n} usable transactions: too few to train, validate and test on`);
  }
  const rounds = req.options?.rounds ?? 200;
  // Fraud is rare: start with the classes balanced (cost-sensitive start), then calibrate on held-out rows.
  const positiveWeight = train.counts.fraud > 0 ? (train.counts.rows - train.counts.fraud) / train.counts.fraud : 1;
  req.onPhase?.('boosting');
  const boostStart = Date.now();
  const result = await (req.trainer ?? trainModel)(
    { features: FEATURES.map(({ name, kind }) => ({ name, kind })), ...train.set, validation: valid.set },
    {
      rounds,
      shrinkage: 0.5,
      classWeights: { positive: positiveWeight, negative: 1 },
      earlyStopping: { patience: 30 },
      ...req.options,
    },
    { onRound: (t) => req.onRound?.(t, rounds), shouldStop: () => req.signal?.aborted === true },
  );
  const trainingMs = Date.now() - boostStart;
  cancelled();
  req.onPhase?.('calibrating and evaluating');
  const raw = result.model;
  // Platt scaling needs both classes among its rows; fraud is rare, so a short window's validation
  // part can hold none. Then refuse to ship a model whose probabilities would be one constant.
  const compiledRaw = compileModel(raw);
  const fit = calibratePlatt(compiledRaw.scoreColumns(valid.set.columns), valid.set.labels);
  if (fit.positives < MIN_CALIBRATION_POSITIVES || fit.positives === fit.n) {
    throw new TrainingError(
      'bad-data',
      `The validation window holds ${fit.positives} confirmed fraud among ${fit.n} rows; calibration needs at least ${MIN_CALIBRATION_POSITIVES}. Widen the training window or wait for more labels.`,
    );
  }
  const model = withCalibration(raw, fit, 'validation');
  const testScores = scoreSet(model, test);
  const evaluation = evaluate(testScores, test.set.labels, {
    timestamps: test.timestamps,
    dailyBudget: req.dailyBudget ?? 50,
    amounts: test.amounts,
  });
  const counts = { ...data.counts, train: train.counts.rows, validation: valid.counts.rows, test: test.counts.rows };
  const modelVersionId = await insertModelVersion(db, {
    label: req.label,
    role: req.role,
    model,
    params: { ...req.options, rounds, positiveWeight, holdoutShare: hold, labelDelayDays: req.labelDelayDays ?? 30 },
    metrics: {
      evaluation,
      counts,
      importance: featureImportance(model),
      trace: result.trace,
      calibration: fit,
      // Curve points from the test-set scores, and the training population for drift reports.
      curves: rocPrCurves(testScores.margin, testScores.probability, test.set.labels),
      baseline: buildDriftBaseline(model, train.set.columns, scoreSet(model, train).probability),
      timing: { trainingMs, totalMs: Date.now() - startedAt },
      windows: {
        train: [new Date(train.timestamps[0]).toISOString(), new Date(train.timestamps[train.timestamps.length - 1]).toISOString()],
        validation: [new Date(valid.timestamps[0]).toISOString(), new Date(valid.timestamps[valid.timestamps.length - 1]).toISOString()],
        test: [new Date(test.timestamps[0]).toISOString(), new Date(test.timestamps[test.timestamps.length - 1]).toISOString()],
      },
    },
    dataFrom: req.from,
    dataTo: data.window?.to ?? req.to,
    trainRows: train.counts.rows,
    notes: req.notes ?? null,
    createdBy: req.createdBy ?? null,
  });
  return { modelVersionId, model, trace: result.trace, evaluation, counts };
}
