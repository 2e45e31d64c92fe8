/**
 * Training options, validated by a zod schema (the hyperparameters of the
 * boosting loop, in the spirit of scikit-learn's parameter validation).
 */
import { z } from 'zod';
import { OptionsError } from './errors';

export const trainOptionsSchema = z
  .object({
    /** T, the number of boosting rounds (upper bound when early stopping is on). Default 100. */
    rounds: z.number().int().min(1).max(100_000).default(100),
    /** Shrinkage nu in (0, 1]: each round adds nu * alpha_t (Friedman 2001). Default 1 (plain AdaBoost). */
    shrinkage: z.number().gt(0).lte(1).default(1),
    /**
     * Per-class start weights (cost-sensitive start): d_i^0 proportional to
     * `positive` for fraud rows and `negative` for legitimate rows. Default 1 / 1 (uniform).
     */
    classWeights: z
      .object({ positive: z.number().positive().finite().default(1), negative: z.number().positive().finite().default(1) })
      .strict()
      .default({ positive: 1, negative: 1 }),
    /**
     * Early stopping on the validation set's exponential loss: stop when it has not
     * improved for `patience` rounds and keep the best round. Needs `validation` in the data.
     */
    earlyStopping: z
      .object({ patience: z.number().int().min(1).default(20), minDelta: z.number().min(0).default(0) })
      .strict()
      .optional(),
    /** Seed of the only randomness: the row sample that quantile cuts are estimated from. */
    seed: z.number().int().min(0).max(2 ** 31 - 1).default(1),
    /** Exact-threshold mode: every distinct value a bin, cuts at midpoints (small data, reference comparisons). */
    exact: z.boolean().default(false),
    /** Maximum value bins per numeric feature in quantile mode (a missing bin comes on top). Default 255. */
    maxBins: z.number().int().min(2).max(255).default(255),
    /** Categories seen fewer times than this pool into the "other" bin. Default 5. */
    minCategoryCount: z.number().int().min(1).default(5),
    /** Quantile cuts are estimated from a seeded sample of at most this many rows. Default 100,000. */
    binSampleSize: z.number().int().min(1000).default(100_000),
    /**
     * Histogram maintenance: 'incremental' (default) updates histograms from the rows on the
     * smaller side of the chosen split; 'rebuild' recomputes them from all rows every round.
     * Both choose the same stumps up to float rounding.
     */
    histogramUpdate: z.enum(['incremental', 'rebuild']).default('incremental'),
    /**
     * Pack low-cardinality features (at most 128 codes) into shared one-byte joint codes so
     * one gather serves several histograms; exact (each histogram is a marginal). Default true.
     */
    bundleFeatures: z.boolean().default(true),
    /**
     * In incremental mode, rebuild histograms exactly every this many rounds to stop drift.
     * Default 32 (the tests see the same stumps as a full rebuild even with 1000).
     */
    rebuildEvery: z.number().int().min(1).default(32),
  })
  .strict();

export type TrainOptionsInput = z.input<typeof trainOptionsSchema>;
export type TrainOptions = z.output<typeof trainOptionsSchema>;

/** Validates options; throws OptionsError listing every bad path. */
export function parseTrainOptions(input: unknown): TrainOptions {
  const result = trainOptionsSchema.safeParse(input ?? {});
  if (!result.success) {
    const issues = result.error.issues.map((i) => ({ path: i.path.join('.') || '(root)', message: i.message }));
    throw new OptionsError(
      `Invalid training options: ${issues.map((i) => `${i.path}: ${i.message}`).join('; ')}`,
      issues,
    );
  }
  return result.data;
}
