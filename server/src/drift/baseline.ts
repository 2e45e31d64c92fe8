import { psi, psiCategorical, type FeatureColumns, type Model, type PsiResult } from '@shared/model/index';

/**
 * The training population's distributions, stored with each model version so
 * later traffic can be compared with it (population stability index). Numeric
 * features and the score keep their decile edges (quantiles of the training
 * rows, as `psi` computes them) and the count of training rows in each bin;
 * categorical features keep a count per category. Counts, not shares, so the
 * comparison later bins exactly what training saw.
 */
export const BASELINE_BINS = 10;
/** Categories beyond this many (the rarest) are pooled into OTHER. */
export const MAX_BASELINE_CATEGORIES = 100;
/** Stands for pooled and unseen categories. */
export const OTHER = '\u0000other';

export interface BinnedBaseline {
  /** Inner edges; a value on an edge belongs to the lower bin (as in `psi`). */
  edges: number[];
  /** Rows per bin: edges.length + 1 value bins, then the missing bin. */
  counts: number[];
}

export type FeatureBaseline =
  | ({ feature: string; kind: 'numeric' } & BinnedBaseline)
  | { feature: string; kind: 'categorical'; categories: string[]; counts: number[]; other: number; missing: number };

export interface DriftBaseline {
  /** Training rows the distributions are taken from. */
  n: number;
  /** The calibrated probability on the training rows. */
  score: BinnedBaseline;
  features: FeatureBaseline[];
}

function binNumeric(values: ArrayLike<number>): BinnedBaseline {
  // psi against itself returns the decile edges and the shares of each bin; shares x n are the counts.
  const r = psi(values, values, BASELINE_BINS);
  return { edges: r.edges, counts: r.expectedShare.map((s) => Math.round(s * values.length)) };
}

function countCategories(values: ReadonlyArray<string | null>): Extract<FeatureBaseline, { kind: 'categorical' }> & { feature: '' } {
  const byValue = new Map<string, number>();
  let missing = 0;
  for (const v of values) {
    if (v === null) missing++;
    else byValue.set(v, (byValue.get(v) ?? 0) + 1);
  }
  const sorted = [...byValue.entries()].sort((a, b) => b[1] - a[1] || (a[0] < b[0] ? -1 : 1));
  const kept = sorted.slice(0, MAX_BASELINE_CATEGORIES);
  const other = sorted.slice(MAX_BASELINE_CATEGORIES).reduce((s, [, c]) => s + c, 0);
  return { feature: '', kind: 'categorical', categories: kept.map(([k]) => k), counts: kept.map(([, c]) => c), other, missing };
}

/**
 * @param model the trained model (its feature list)
 * @param columns training rows by feature (Float64Array with NaN / (string | null)[]), length n each
 * @param probability the model's probability on the same rows, length n
 */
export function buildDriftBaseline(model: Model, columns: FeatureColumns, probability: ArrayLike<number>): DriftBaseline {
  const features = model.features.map((f): FeatureBaseline => {
    const col = columns[f.name];
    if (f.kind === 'numeric') return { feature: f.name, kind: 'numeric', ...binNumeric(col as Float64Array) };
    return { ...countCategories(col as ReadonlyArray<string | null>), feature: f.name };
  });
  return { n: probability.length, score: binNumeric(probability), features };
}

/** One stand-in value per bin, repeated by its count: binned again with the same edges it lands in the same bins. */
function expandBinned(b: BinnedBaseline): Float64Array {
  const total = b.counts.reduce((s, c) => s + c, 0);
  const out = new Float64Array(total);
  const K = b.edges.length;
  let at = 0;
  b.counts.forEach((c, bin) => {
    const v = bin === K + 1 ? NaN : bin < K ? b.edges[bin] : K > 0 ? b.edges[K - 1] + 1 : 0;
    out.fill(v, at, at + c);
    at += c;
  });
  return out;
}

/** PSI of live values of a numeric feature (or the score) against its stored bins. */
export function psiNumeric(b: BinnedBaseline, actual: ArrayLike<number>): PsiResult {
  return psi(expandBinned(b), actual, b.edges);
}

/** PSI of live values of a categorical feature against its stored counts; unseen and pooled categories meet in OTHER. */
export function psiOfCategories(b: Extract<FeatureBaseline, { kind: 'categorical' }>, actual: ReadonlyArray<string | null>): PsiResult {
  const expected: (string | null)[] = [];
  b.categories.forEach((c, i) => {
    for (let k = 0; k < b.counts[i]; k++) expected.push(c);
  });
  for (let k = 0; k < b.other; k++) expected.push(OTHER);
  for (let k = 0; k < b.missing; k++) expected.push(null);
  const known = new Set(b.categories);
  return psiCategorical(expected, actual.map((v) => (v === null ? null : known.has(v) ? v : OTHER)));
}
