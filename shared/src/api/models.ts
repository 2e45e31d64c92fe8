import { z } from 'zod';
import { FRAUD_TYPES } from './cases';

/**
 * The model-lifecycle API shared by the server (validation) and the client
 * (forms and types): training runs and their schedule, the version registry
 * and its evaluations, champion/challenger promotion requests, drift reports
 * and labels. Times are ISO 8601 UTC strings.
 */

export interface PersonRef {
  id: number;
  displayName: string;
}

export const MODEL_ROLES = ['champion', 'challenger', 'candidate', 'retired'] as const;
export type ModelRole = (typeof MODEL_ROLES)[number];
export const MODEL_ROLE_LABELS: Record<ModelRole, string> = {
  champion: 'Champion',
  challenger: 'Challenger',
  candidate: 'Candidate',
  retired: 'Retired',
};

// ---------------------------------------------------------------------------
// Training runs

export const TRAINING_STATUSES = ['queued', 'running', 'completed', 'failed', 'cancelled'] as const;
export type TrainingStatus = (typeof TRAINING_STATUSES)[number];
export const TRAINING_STATUS_LABELS: Record<TrainingStatus, string> = {
  queued: 'Waiting to start',
  running: 'Running',
  completed: 'Finished',
  failed: 'Failed',
  cancelled: 'Cancelled',
};
export const isFinished = (s: TrainingStatus) => s === 'completed' || s === 'failed' || s === 'cancelled';

/** Socket.IO event with the progress of a training run (to data scientists and supervisors). */
export const TRAINING_PROGRESS_EVENT = 'training:progress';
/** Socket.IO events when a promotion request is filed or decided, and when a drift report is stored. */
export const PROMOTION_CHANGED_EVENT = 'models:promotion';
export const DRIFT_REPORTED_EVENT = 'models:drift';
/** Sent (by the existing bridge) when the champion or challenger changes. */
export const MODELS_CHANGED_EVENT = 'models:changed';

/** One point of the loss curve: exponential losses after round `round`. */
export interface LossPoint {
  round: number;
  trainLoss: number;
  validationLoss: number | null;
}

export interface TrainingProgress {
  /** Rounds done so far (k of T). */
  round: number;
  /** T: the round budget (early stopping may end sooner). */
  totalRounds: number;
  trainLoss: number | null;
  validationLoss: number | null;
  /** What the run is doing now, in words ("reading labelled transactions", "boosting", "evaluating"). */
  phase: string;
}

export interface TrainingProgressEvent extends TrainingProgress {
  runId: number;
  status: TrainingStatus;
  /** Curve points since the previous event (events are throttled; every round arrives in some event). */
  points: LossPoint[];
  modelVersionId: number | null;
  error: string | null;
  at: string;
}

export interface TrainingParams {
  from: string;
  to: string;
  rounds: number;
  labelDelayDays: number;
  shrinkage: number;
  label: string | null;
  notes: string | null;
}

export interface TrainingRun {
  id: number;
  status: TrainingStatus;
  trigger: 'manual' | 'schedule';
  requestedBy: PersonRef | null;
  params: TrainingParams;
  progress: TrainingProgress;
  /** The whole loss curve so far (stored as the run goes). */
  curve: LossPoint[];
  modelVersionId: number | null;
  modelVersionLabel: string | null;
  error: string | null;
  cancelRequested: boolean;
  createdAt: string;
  startedAt: string | null;
  finishedAt: string | null;
}

/** POST /api/training/runs ("train now"): the window defaults to the schedule's. */
export const startTrainingSchema = z
  .object({
    /** Days of labelled history before `to` to build the data set from. */
    windowDays: z.number().int().min(7).max(400).optional(),
    /** End of the window (default now); it moves back to the label-delay cut-off. */
    to: z.iso.datetime({ offset: true }).optional(),
    rounds: z.number().int().min(5).max(5000).optional(),
    labelDelayDays: z.number().int().min(0).max(180).optional(),
    shrinkage: z.number().gt(0).lte(1).optional(),
    /** Registry label of the new version (default: generated from the date). */
    label: z
      .string()
      .trim()
      .regex(/^[A-Za-z0-9][A-Za-z0-9._-]{0,39}$/, 'Letters, digits, dot, dash and underscore; up to 40')
      .optional(),
    notes: z.string().trim().max(2000).optional(),
  })
  .strict();
export type StartTrainingInput = z.infer<typeof startTrainingSchema>;

// ---------------------------------------------------------------------------
// Schedule

const CRON_FIELDS = [
  { name: 'minute', min: 0, max: 59 },
  { name: 'hour', min: 0, max: 23 },
  { name: 'day of month', min: 1, max: 31 },
  { name: 'month', min: 1, max: 12 },
  { name: 'day of week', min: 0, max: 7 },
] as const;

/**
 * Checks a five-field cron pattern (minute hour day-of-month month
 * day-of-week; numbers, `*`, ranges `a-b`, steps `/n` and lists), the POSIX
 * crontab grammar without names. The minute must be one number, so the
 * retraining runs at most once an hour. Returns the problem in words, or null.
 */
export function cronProblem(pattern: string): string | null {
  const parts = pattern.trim().split(/\s+/);
  if (parts.length !== 5) return 'Write five fields: minute hour day-of-month month day-of-week (e.g. "0 2 * * *").';
  for (let f = 0; f < 5; f++) {
    const { name, min, max } = CRON_FIELDS[f];
    for (const item of parts[f].split(',')) {
      const m = /^(\*|(\d{1,2})(?:-(\d{1,2}))?)(?:\/(\d{1,2}))?$/.exec(item);
      if (!m) return `The ${name} field "${parts[f]}" is not a number, range, list or step.`;
      const lo = m[2] === undefined ? min : Number(m[2]);
      const hi = m[3] === undefined ? (m[2] === undefined ? max : lo) : Number(m[3]);
      if (lo < min || hi > max || lo > hi) return `The ${name} field must stay within ${min}-${max}.`;
      if (m[4] !== undefined && (Number(m[4]) < 1 || Number(m[4]) > max)) return `The step in the ${name} field must be 1-${max}.`;
    }
  }
  if (!/^\d{1,2}$/.test(parts[0])) return 'The minute must be a single number (at most one run an hour).';
  return null;
}

/** A time zone the runtime knows (IANA name, e.g. "Europe/Berlin", or "UTC"). */
export function isTimeZone(tz: string): boolean {
  if (!/^[A-Za-z0-9_+\-/]{1,64}$/.test(tz)) return false;
  try {
    new Intl.DateTimeFormat('en-GB', { timeZone: tz });
    return true;
  } catch {
    return false;
  }
}

export const trainingScheduleSchema = z
  .object({
    enabled: z.boolean(),
    cron: z
      .string()
      .trim()
      .max(100)
      .superRefine((v, ctx) => {
        const problem = cronProblem(v);
        if (problem) ctx.addIssue({ code: 'custom', message: problem });
      }),
    timezone: z
      .string()
      .trim()
      .refine(isTimeZone, 'Not a time zone this server knows: use an IANA name such as Europe/Berlin, or UTC.'),
    windowDays: z.number().int().min(7).max(400),
    rounds: z.number().int().min(5).max(2000),
    labelDelayDays: z.number().int().min(0).max(180),
  })
  .strict();
export type TrainingSchedule = z.infer<typeof trainingScheduleSchema>;

export interface TrainingScheduleView {
  schedule: TrainingSchedule;
  /** When the job scheduler fires next (null when disabled or not registered yet). */
  nextRunAt: string | null;
  lastRun: { id: number; status: TrainingStatus; createdAt: string; finishedAt: string | null } | null;
  updatedBy: PersonRef | null;
  updatedAt: string | null;
}

// ---------------------------------------------------------------------------
// Registry

export interface CurvePoint {
  x: number;
  y: number;
  /** The probability at which this point is reached (scores at or above it alerted). */
  threshold: number;
}

export interface Curves {
  /** ROC: x = false-positive rate, y = true-positive rate. */
  roc: CurvePoint[];
  /** PR: x = recall, y = precision. */
  pr: CurvePoint[];
  /** Points before down-sampling. */
  pointsBefore: number;
}

export interface ClassHistogram {
  edges: number[];
  fraud: number[];
  legitimate: number[];
}

export interface ReliabilityBin {
  lower: number;
  upper: number;
  count: number;
  meanPredicted: number | null;
  observedRate: number | null;
}

export interface Evaluation {
  n: number;
  fraud: number;
  rocAuc: number;
  averagePrecision: number;
  brier: number;
  reliability: ReliabilityBin[];
  marginHistogram: ClassHistogram;
  normalizedMarginHistogram: ClassHistogram;
  probabilityHistogram: ClassHistogram;
  alertBudget: {
    dailyBudget: number;
    days: number;
    alerts: number;
    fraudAlerted: number;
    fraudTotal: number;
    precision: number | null;
    recall: number | null;
    amountRecall: number | null;
  } | null;
}

export interface Headline {
  rocAuc: number | null;
  averagePrecision: number | null;
  brier: number | null;
  precisionAtBudget: number | null;
  recallAtBudget: number | null;
}

export interface ModelVersionSummary {
  id: number;
  label: string;
  role: ModelRole;
  createdAt: string;
  promotedAt: string | null;
  createdBy: PersonRef | null;
  dataFrom: string | null;
  dataTo: string | null;
  trainRows: number | null;
  counts: { rows: number; fraud: number; labelled: number; presumedLegitimate: number; train: number; validation: number; test: number } | null;
  headline: Headline;
  trainingSeconds: number | null;
  rounds: number;
  notes: string | null;
}

export interface RoundRow {
  round: number;
  feature: string;
  kind: 'numeric' | 'categorical';
  /** e.g. "amount > 610.00", "channel = ecommerce", "speed_kmh missing". */
  rule: string;
  threshold: number | null;
  category: string | null;
  polarity: 1 | -1;
  edge: number;
  weightedError: number;
  alpha: number;
  trainLoss: number;
  validationLoss: number | null;
  /** False for rounds after the best round (early stopping drops them from the model). */
  kept: boolean;
}

export type StepFunction =
  | { kind: 'numeric'; feature: string; cuts: number[]; values: number[]; missing: number; mean: number }
  | { kind: 'categorical'; feature: string; levels: { label: string; value: number }[]; mean: number };

export interface ModelVersionDetail extends ModelVersionSummary {
  params: Record<string, unknown> | null;
  evaluation: Evaluation | null;
  curves: Curves | null;
  roundTable: RoundRow[];
  importance: { feature: string; importance: number; share: number; stumps: number }[];
  stepFunctions: StepFunction[];
  calibration: { a: number; b: number; n: number; positives: number } | null;
  windows: { train: [string, string]; validation: [string, string]; test: [string, string] } | null;
  training: {
    roundsRun: number;
    bestRound: number;
    stoppedBy: string;
    nTrain: number;
    nTrainPositive: number;
    nValidation: number;
    nValidationPositive: number;
    /** The options boosting ran with. */
    shrinkage: number;
    maxRounds: number;
  };
  features: { name: string; kind: 'numeric' | 'categorical' }[];
  hasDriftBaseline: boolean;
}

export const compareQuerySchema = z.object({
  a: z.coerce.number().int().positive(),
  b: z.coerce.number().int().positive(),
  from: z.iso.datetime({ offset: true }).optional(),
  to: z.iso.datetime({ offset: true }).optional(),
});

export interface ComparedVersion {
  id: number;
  label: string;
  role: ModelRole;
  rocAuc: number;
  averagePrecision: number;
  brier: number;
  curves: Curves;
  /** At the current alert threshold. */
  alerts: number;
  precision: number | null;
  recall: number | null;
  /** True when the comparison window overlaps this version's own training rows (its figures flatter it). */
  overlapsTraining: boolean;
}

export interface CompareResult {
  window: { from: string; to: string };
  rows: number;
  fraud: number;
  threshold: number;
  versions: [ComparedVersion, ComparedVersion];
}

// ---------------------------------------------------------------------------
// Champion and challenger

export const shadowQuerySchema = z.object({ days: z.coerce.number().int().min(1).max(90).default(14) });

export interface ShadowSide {
  id: number;
  label: string;
  alerts: number;
  labelledAlerts: number;
  fraudCaught: number;
  precision: number | null;
  recall: number | null;
}

export interface ShadowComparison {
  since: string;
  threshold: number;
  /** Transactions scored by the champion with a shadow score from the challenger. */
  transactions: number;
  labelled: number;
  fraud: number;
  bothAlerted: number;
  champion: ShadowSide | null;
  challenger: ShadowSide | null;
}

export const PROMOTION_STATUSES = ['pending', 'approved', 'rejected', 'withdrawn'] as const;
export type PromotionStatus = (typeof PROMOTION_STATUSES)[number];
export const PROMOTION_STATUS_LABELS: Record<PromotionStatus, string> = {
  pending: 'Waiting for approval',
  approved: 'Approved',
  rejected: 'Turned down',
  withdrawn: 'Withdrawn',
};

export const promotionRequestSchema = z
  .object({
    modelVersionId: z.number().int().positive(),
    reason: z
      .string()
      .trim()
      .min(20, 'Write the reason in a sentence or two (20 characters at least): the approver and the audit read it')
      .max(4000),
  })
  .strict();
export type PromotionRequestInput = z.infer<typeof promotionRequestSchema>;

export const promotionDecisionSchema = z
  .object({
    decision: z.enum(['approve', 'reject']),
    note: z.string().trim().max(2000).default(''),
  })
  .strict()
  .superRefine((v, ctx) => {
    if (v.decision === 'reject' && v.note.length < 5) ctx.addIssue({ code: 'custom', path: ['note'], message: 'Say why it is turned down' });
  });
export type PromotionDecisionInput = z.input<typeof promotionDecisionSchema>;

export interface PromotionRequest {
  id: number;
  /** promote: a newer version replaces the champion; rollback: an earlier (retired) version comes back. */
  kind: 'promote' | 'rollback';
  status: PromotionStatus;
  modelVersion: { id: number; label: string };
  fromChampion: { id: number; label: string } | null;
  reason: string;
  requestedBy: PersonRef;
  requestedAt: string;
  decidedBy: PersonRef | null;
  decidedAt: string | null;
  decisionNote: string | null;
}

// ---------------------------------------------------------------------------
// Drift

export type PsiBand = 'stable' | 'watch' | 'act';
/** Above this PSI the report flags the feature (rule of thumb, common practice). */
export const PSI_FLAG = 0.25;

export interface DriftReport {
  id: number;
  modelVersion: { id: number; label: string };
  windowFrom: string;
  windowTo: string;
  rows: number;
  score: { psi: number; band: PsiBand };
  features: { feature: string; kind: 'numeric' | 'categorical'; psi: number; band: PsiBand }[];
  maxPsi: number;
  flagged: string[];
  computedAt: string;
}

// ---------------------------------------------------------------------------
// Labels

export interface CoverageWeek {
  /** Monday of the ISO week (UTC), YYYY-MM-DD. */
  weekStart: string;
  transactions: number;
  labelled: number;
  fraud: number;
  legitimate: number;
  /** labelled / transactions. */
  share: number;
}

export interface LabelDelay {
  /** Fraud labels in the period, by days from transaction to report; toDays -1 is the open last bin. */
  bins: { fromDays: number; toDays: number; disposition: number; chargeback: number; other: number }[];
  count: number;
  medianDays: number | null;
  p90Days: number | null;
  since: string;
}

/** Columns of a late-labels file: the upstream transaction id, when the chargeback was reported, the fraud type. */
export const LATE_LABEL_COLUMNS = ['transactionId', 'reportedAt', 'fraudType'] as const;
export const LATE_LABEL_FRAUD_TYPES = FRAUD_TYPES;

export interface LabelImport {
  id: number;
  fileName: string;
  status: 'running' | 'completed' | 'failed';
  counts: { rowsRead: number; added: number; duplicate: number; rejected: number };
  error: { code: string; message: string } | null;
  errorReportUrl: string | null;
  uploadedBy: PersonRef;
  startedAt: string;
  finishedAt: string | null;
}

// ---------------------------------------------------------------------------
// Model card

export const MODEL_CARD_CAUTIONS = [
  'The score is evidence, not a verdict: decisions to block a card or report a customer stay with trained staff under the institution’s policy and local law.',
  'Labels come only from alerted transactions (investigators’ dispositions) and from chargebacks reported later. Fraud that was never alerted and never charged back is missing, so unalerted fraud is under-represented and recall figures are upper bounds.',
  'Transactions without a fraud label that are older than the label delay are counted as legitimate; a late chargeback can still turn one into fraud.',
  'Figures come from held-out rows newer than the training rows. They describe that period; fraud patterns change, so watch the drift reports.',
];
