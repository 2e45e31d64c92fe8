/**
 * The fitted model: a versioned, JSON-serialisable value, validated on load.
 *
 * F(x) = sum_t alpha_t h_t(x) over the stored stumps (alpha_t already
 * includes the shrinkage nu). Everything needed to score is inside: feature
 * specs, bins (so new data is binned as the training data was), stumps,
 * Platt calibration, the training-population baseline E[g_f] used by the
 * explainer, and a training summary.
 */
import { z } from 'zod';
import { ModelFormatError } from './errors';
import { trainOptionsSchema } from './options';

export const MODEL_FORMAT = 'edgecase.boosted-stumps';
export const MODEL_SCHEMA_VERSION = 1;

const finite = z.number().finite();

const featureSpecSchema = z.object({ name: z.string().min(1), kind: z.enum(['numeric', 'categorical']) }).strict();

const numericBinsSchema = z
  .object({ name: z.string().min(1), kind: z.literal('numeric'), cuts: z.array(finite) })
  .strict()
  .refine((b) => b.cuts.every((c, i) => i === 0 || c > b.cuts[i - 1]), { message: 'cuts must be strictly increasing' });

const categoricalBinsSchema = z
  .object({
    name: z.string().min(1),
    kind: z.literal('categorical'),
    categories: z.array(z.string()),
    pooledCategories: z.number().int().min(0),
  })
  .strict()
  .refine((b) => new Set(b.categories).size === b.categories.length, { message: 'categories must be unique' });

const binningSchema = z
  .object({
    mode: z.enum(['quantile', 'exact']),
    maxBins: z.number().int().min(2).max(255),
    features: z.array(z.union([numericBinsSchema, categoricalBinsSchema])),
  })
  .strict();

/**
 * Numeric stump: h(x) = s if x is on the right side else -s, where the right
 * side is x > threshold (raw units) for a present value, and `missingRight`
 * says where a missing value goes. `cut` is the bin index k (x > c_k <=> b(x) > k);
 * cut = K (number of cuts) with threshold null is the missingness indicator
 * (right side = missing only).
 */
const numericStumpSchema = z
  .object({
    kind: z.literal('numeric'),
    feature: z.string().min(1),
    featureIndex: z.number().int().min(0),
    cut: z.number().int().min(0),
    threshold: finite.nullable(),
    missingRight: z.boolean(),
    polarity: z.union([z.literal(1), z.literal(-1)]),
    alpha: finite,
  })
  .strict();

/**
 * Categorical stump: h(x) = s if b(x) = code else -s. `match` tells what the
 * code stands for: a kept category (named in `category`), the pooled "other"
 * bin (rare or unseen categories) or missing.
 */
const categoricalStumpSchema = z
  .object({
    kind: z.literal('categorical'),
    feature: z.string().min(1),
    featureIndex: z.number().int().min(0),
    code: z.number().int().min(0),
    match: z.enum(['category', 'other', 'missing']),
    category: z.string().nullable(),
    polarity: z.union([z.literal(1), z.literal(-1)]),
    alpha: finite,
  })
  .strict();

const stumpSchema = z.discriminatedUnion('kind', [numericStumpSchema, categoricalStumpSchema]);

/** Platt (1999): p = 1 / (1 + exp(-(a F + b))), fitted on held-out scores. */
const calibrationSchema = z
  .object({
    method: z.literal('platt'),
    a: finite,
    b: finite,
    fittedOn: z.enum(['validation', 'holdout-tail', 'caller']),
    n: z.number().int().min(1),
    positives: z.number().int().min(0),
  })
  .strict();

const trainingSummarySchema = z
  .object({
    roundsRun: z.number().int().min(0),
    bestRound: z.number().int().min(0),
    stoppedBy: z.enum(['rounds', 'early-stopping', 'perfect-split', 'no-edge']),
    options: trainOptionsSchema,
    nTrain: z.number().int().min(1),
    nTrainPositive: z.number().int().min(0),
    nValidation: z.number().int().min(0),
    nValidationPositive: z.number().int().min(0),
    trainLoss: finite,
    trainError: finite,
    validationLoss: finite.nullable(),
    validationError: finite.nullable(),
  })
  .strict();

export const modelSchema = z
  .object({
    format: z.literal(MODEL_FORMAT),
    schemaVersion: z.literal(MODEL_SCHEMA_VERSION),
    features: z.array(featureSpecSchema).min(1),
    binning: binningSchema,
    stumps: z.array(stumpSchema),
    calibration: calibrationSchema.nullable(),
    /** E[g_f] over the training rows, per feature in model order, and E[F] = sum_f E[g_f]. */
    baseline: z.object({ expectedF: finite, featureMeans: z.array(finite) }).strict(),
    training: trainingSummarySchema,
  })
  .strict()
  .superRefine((m, ctx) => {
    if (m.binning.features.length !== m.features.length) {
      ctx.addIssue({ code: 'custom', path: ['binning', 'features'], message: 'one bin spec per feature expected' });
      return;
    }
    m.features.forEach((f, i) => {
      const b = m.binning.features[i];
      if (b.name !== f.name || b.kind !== f.kind) {
        ctx.addIssue({ code: 'custom', path: ['binning', 'features', i], message: `bins do not match feature "${f.name}"` });
      }
    });
    if (m.baseline.featureMeans.length !== m.features.length) {
      ctx.addIssue({ code: 'custom', path: ['baseline', 'featureMeans'], message: 'one mean per feature expected' });
    }
    m.stumps.forEach((s, t) => {
      const f = m.features[s.featureIndex];
      if (!f || f.name !== s.feature || f.kind !== s.kind) {
        ctx.addIssue({ code: 'custom', path: ['stumps', t], message: 'stump refers to an unknown feature' });
        return;
      }
      const b = m.binning.features[s.featureIndex];
      if (s.kind === 'numeric' && b.kind === 'numeric') {
        const ok = s.cut < b.cuts.length ? s.threshold === b.cuts[s.cut] : s.cut === b.cuts.length && s.threshold === null;
        if (!ok) ctx.addIssue({ code: 'custom', path: ['stumps', t, 'threshold'], message: 'threshold does not match the bins' });
      }
      if (s.kind === 'categorical' && b.kind === 'categorical') {
        const C = b.categories.length;
        const ok =
          (s.match === 'category' && s.code < C && s.category === b.categories[s.code]) ||
          (s.match === 'other' && s.code === C && s.category === null) ||
          (s.match === 'missing' && s.code === C + 1 && s.category === null);
        if (!ok) ctx.addIssue({ code: 'custom', path: ['stumps', t, 'code'], message: 'category code does not match the bins' });
      }
    });
  });

export type Model = z.infer<typeof modelSchema>;
export type Stump = Model['stumps'][number];
export type NumericStump = Extract<Stump, { kind: 'numeric' }>;
export type CategoricalStump = Extract<Stump, { kind: 'categorical' }>;
export type PlattCalibration = NonNullable<Model['calibration']>;
export type TrainingSummary = Model['training'];

/**
 * Reads a model from a JSON string or an already-parsed value.
 * Throws ModelFormatError with a readable reason for non-JSON, a file that
 * is not an Edgecase model, an unsupported schema version, or a model whose
 * parts disagree.
 */
export function parseModel(json: unknown): Model {
  let value: unknown = json;
  if (typeof json === 'string') {
    try {
      value = JSON.parse(json);
    } catch (e) {
      throw new ModelFormatError(`Model file is not valid JSON: ${(e as Error).message}`, { cause: e });
    }
  }
  if (typeof value !== 'object' || value === null || Array.isArray(value)) {
    throw new ModelFormatError('Model file must hold a JSON object');
  }
  const v = value as Record<string, unknown>;
  if (v.format !== MODEL_FORMAT) {
    throw new ModelFormatError(
      `Not an Edgecase scoring model (expected format "${MODEL_FORMAT}", found ${v.format === undefined ? 'no format field' : JSON.stringify(v.format)})`,
    );
  }
  if (v.schemaVersion !== MODEL_SCHEMA_VERSION) {
    throw new ModelFormatError(
      `Unsupported model schema version ${JSON.stringify(v.schemaVersion)} (this engine reads version ${MODEL_SCHEMA_VERSION})`,
    );
  }
  const r = modelSchema.safeParse(value);
  if (!r.success) {
    const first = r.error.issues.slice(0, 5).map((i) => `${i.path.join('.') || '(root)'}: ${i.message}`);
    throw new ModelFormatError(`Invalid model file: ${first.join('; ')}`);
  }
  return r.data;
}

/** The JSON text of a model (plain JSON; no NaN or Infinity ever appears in a valid model). */
export function serializeModel(model: Model): string {
  return JSON.stringify(model);
}
