/**
 * Feature binning: maps raw feature values to small integer codes b_f(x).
 *
 * Numeric feature with K cuts c_0 < ... < c_{K-1}:
 *   b(x) = #{k : c_k < x}  in 0..K   (so b(x) > k  <=>  x > c_k),
 *   missing (NaN) gets its own code K + 1.
 * Categorical feature with C kept categories:
 *   b(x) = index of x in `categories` (0..C-1), C for "other" (rare categories
 *   pooled at fit time, and any category unseen at fit time), C + 1 for missing.
 *
 * Quantile mode (default): at most `maxBins` value bins per numeric feature,
 * cuts at quantiles of a seeded row sample, each cut placed at the midpoint
 * between two neighbouring distinct values (as in histogram GBMs; common
 * practice). A feature with at most `maxBins` distinct values gets one bin per
 * value. Codes fit in a Uint8Array (255 value bins + missing = 256 codes).
 *
 * Exact mode: every distinct training value is its own bin and every midpoint
 * between neighbouring distinct values is a candidate cut, which is the
 * dictionary of the textbook brute-force stump. Codes are Uint16 (or Uint32
 * past 65,536 codes).
 *
 * The fitted `Binning` is stored in the model so scoring bins new data
 * identically.
 */
import { TrainingError } from './errors';
import type { CategoricalColumn, CodeArray, FeatureColumns, FeatureSpec, NumericColumn } from './types';

export interface NumericFeatureBins {
  name: string;
  kind: 'numeric';
  /** Strictly increasing raw thresholds; K = cuts.length, K + 1 value bins, code K + 1 = missing. */
  cuts: number[];
}

export interface CategoricalFeatureBins {
  name: string;
  kind: 'categorical';
  /** Kept categories, most frequent first; code C = "other", C + 1 = missing. */
  categories: string[];
  /** How many distinct training categories were pooled into "other" (rare ones). */
  pooledCategories: number;
}

export type FeatureBins = NumericFeatureBins | CategoricalFeatureBins;

export interface Binning {
  mode: 'quantile' | 'exact';
  maxBins: number;
  features: FeatureBins[];
}

export interface BinningOptions {
  /** Maximum value bins per numeric feature in quantile mode (2..255). Default 255. */
  maxBins?: number;
  /** Exact-threshold mode. Default false. */
  exact?: boolean;
  /** Categories seen fewer times pool into "other". Default 5 (1 in exact mode is not implied: same rule). */
  minCategoryCount?: number;
  /** Row sample size for quantile estimation. Default 100,000. */
  sampleSize?: number;
  /** Seed of the row sample. Default 1. */
  seed?: number;
}

/** Number of codes of a feature (value bins + "other" where categorical + missing). */
export function codeCount(bins: FeatureBins): number {
  return bins.kind === 'numeric' ? bins.cuts.length + 2 : bins.categories.length + 2;
}

/** The code reserved for a missing value. */
export function missingCode(bins: FeatureBins): number {
  return codeCount(bins) - 1;
}

/** Seeded 32-bit PRNG (mulberry32); deterministic across platforms. */
export function mulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/**
 * A threshold strictly between neighbouring distinct values a < b, so that
 * x > t  <=>  x >= b for every training value. The midpoint is what the
 * textbook stump (and scikit-learn's trees) use; if (a + b) / 2 rounds onto b
 * (adjacent doubles) fall back to a.
 */
export function midpoint(a: number, b: number): number {
  const m = (a + b) / 2;
  return m >= a && m < b ? m : a;
}

function isNumericColumn(c: unknown): c is NumericColumn {
  return c instanceof Float64Array;
}

function fitNumeric(name: string, col: NumericColumn, o: Required<BinningOptions>, sampleRows: Int32Array | null): NumericFeatureBins {
  const n = col.length;
  let nonMissing = 0;
  for (let i = 0; i < n; i++) {
    const v = col[i];
    if (v === v) {
      if (v === Infinity || v === -Infinity) {
        throw new TrainingError('bad-data', `Feature "${name}" row ${i + 1}: infinite value (use NaN for missing)`);
      }
      nonMissing++;
    }
  }
  if (nonMissing === 0) return { name, kind: 'numeric', cuts: [] };
  let sample: Float64Array;
  if (o.exact || nonMissing <= o.sampleSize || !sampleRows) {
    sample = new Float64Array(nonMissing);
    let j = 0;
    for (let i = 0; i < n; i++) {
      const v = col[i];
      if (v === v) sample[j++] = v;
    }
  } else {
    // The shared row sample is sorted, so these reads walk the column in order.
    const buf = new Float64Array(sampleRows.length);
    let j = 0;
    for (let k = 0; k < sampleRows.length; k++) {
      const v = col[sampleRows[k]];
      if (v === v) buf[j++] = v;
    }
    sample = j > 0 ? buf.subarray(0, j) : buf.subarray(0, 0);
    if (j === 0) return fitNumeric(name, col, { ...o, sampleSize: Number.MAX_SAFE_INTEGER }, null);
  }
  sample.sort();
  const m = sample.length;
  // Distinct values of the sample.
  const distinct: number[] = [];
  for (let i = 0; i < m; i++) if (i === 0 || sample[i] !== sample[i - 1]) distinct.push(sample[i]);
  const cuts: number[] = [];
  if (o.exact || distinct.length <= o.maxBins) {
    for (let k = 0; k + 1 < distinct.length; k++) cuts.push(midpoint(distinct[k], distinct[k + 1]));
    return { name, kind: 'numeric', cuts };
  }
  // Quantile cuts: for q = 1..maxBins-1 take the sample value at rank q*m/maxBins and cut just above it.
  // A heavy value (e.g. many zeros) then spans several quantiles and gets a single bin.
  let lastUpper = -Infinity;
  for (let q = 1; q < o.maxBins; q++) {
    const v = sample[Math.min(m - 1, Math.floor((q * m) / o.maxBins))];
    if (v <= lastUpper) continue;
    // smallest sample value strictly above v
    let lo = 0;
    let hi = m;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if (sample[mid] <= v) lo = mid + 1;
      else hi = mid;
    }
    if (lo >= m) break;
    const upper = sample[lo];
    cuts.push(midpoint(v, upper));
    lastUpper = v;
  }
  return { name, kind: 'numeric', cuts };
}

function fitCategorical(name: string, col: CategoricalColumn, o: Required<BinningOptions>): CategoricalFeatureBins {
  // One map lookup per row: the map gives a slot, the counts live in a typed array.
  const slot = new Map<string, number>();
  let cnt = new Int32Array(64);
  for (let i = 0; i < col.length; i++) {
    const v = col[i];
    if (v === null || v === undefined || v === '') continue;
    let k = slot.get(v);
    if (k === undefined) {
      if (typeof v !== 'string') {
        throw new TrainingError('bad-data', `Feature "${name}" row ${i + 1}: categorical values must be strings or null`);
      }
      k = slot.size;
      slot.set(v, k);
      if (k === cnt.length) {
        const grown = new Int32Array(2 * cnt.length);
        grown.set(cnt);
        cnt = grown;
      }
    }
    cnt[k]++;
  }
  const counts = new Map<string, number>();
  for (const [v, k] of slot) counts.set(v, cnt[k]);
  const ranked = [...counts.entries()].sort((a, b) => b[1] - a[1] || (a[0] < b[0] ? -1 : a[0] > b[0] ? 1 : 0));
  const cap = o.exact ? Number.MAX_SAFE_INTEGER : o.maxBins - 1;
  const kept = ranked.filter(([, c]) => c >= o.minCategoryCount).slice(0, cap).map(([k]) => k);
  return { name, kind: 'categorical', categories: kept, pooledCategories: ranked.length - kept.length };
}

/**
 * Learns the bins of every feature from training columns.
 *
 * @param columns feature columns by name, each of length n (Float64Array with NaN = missing, or string|null[])
 * @param specs   the features to bin, in model order
 * @param options maxBins (default 255), exact (default false), minCategoryCount, sampleSize, seed
 */
export function fitBinning(columns: FeatureColumns, specs: FeatureSpec[], options: BinningOptions = {}): Binning {
  const o: Required<BinningOptions> = {
    maxBins: options.maxBins ?? 255,
    exact: options.exact ?? false,
    minCategoryCount: options.minCategoryCount ?? 5,
    sampleSize: options.sampleSize ?? 100_000,
    seed: options.seed ?? 1,
  };
  if (!(o.maxBins >= 2 && o.maxBins <= 255)) throw new TrainingError('bad-data', `maxBins must be in 2..255, got ${o.maxBins}`);
  // One seeded row sample (with replacement, sorted) shared by every numeric feature: cheap, and the
  // quantile error of a 100k sample (about 390 rows per bin at 255 bins) is well below a bin width.
  const n = specs.length ? (columns[specs[0].name]?.length ?? 0) : 0;
  let sampleRows: Int32Array | null = null;
  if (!o.exact && n > o.sampleSize) {
    const rand = mulberry32(o.seed);
    sampleRows = Int32Array.from({ length: o.sampleSize }, () => Math.floor(rand() * n)).sort();
  }
  const features = specs.map((spec): FeatureBins => {
    const col = columns[spec.name];
    if (col === undefined) throw new TrainingError('bad-data', `Feature "${spec.name}" has no column`);
    if (spec.kind === 'numeric') {
      if (!isNumericColumn(col)) throw new TrainingError('bad-data', `Feature "${spec.name}" is numeric: its column must be a Float64Array`);
      if (col.length !== n) throw new TrainingError('bad-data', `Feature "${spec.name}" has ${col.length} rows, expected ${n}`);
      return fitNumeric(spec.name, col, o, sampleRows);
    }
    if (isNumericColumn(col)) throw new TrainingError('bad-data', `Feature "${spec.name}" is categorical: its column must hold strings or null`);
    return fitCategorical(spec.name, col, o);
  });
  return { mode: o.exact ? 'exact' : 'quantile', maxBins: o.maxBins, features };
}

/** Allocator of the memory behind code arrays (e.g. SharedArrayBuffer for worker threads). */
export type Allocate = (bytes: number) => ArrayBufferLike;

function allocCodes(nCodes: number, n: number, alloc?: Allocate): CodeArray {
  if (nCodes <= 256) return alloc ? new Uint8Array(alloc(n) as ArrayBuffer) : new Uint8Array(n);
  if (nCodes <= 65536) return alloc ? new Uint16Array(alloc(2 * n) as ArrayBuffer) : new Uint16Array(n);
  return alloc ? new Uint32Array(alloc(4 * n) as ArrayBuffer) : new Uint32Array(n);
}

/** Code of one numeric value: #cuts below it, or the missing code. */
export function numericCode(cuts: ArrayLike<number>, v: number): number {
  if (v !== v) return cuts.length + 1;
  let lo = 0;
  let hi = cuts.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (cuts[mid] < v) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/**
 * Byte codes of a numeric column over a cut table padded to 255 entries with
 * +Inf: 8 fixed steps give #cuts < v, with arithmetic on the comparison
 * results instead of unpredictable branches; NaN compares false everywhere
 * (p = 0) and takes the missing code arithmetically too. Two monomorphic
 * copies (rows in order, or through a permutation) keep the loop tight.
 */
function byteCodes(col: Float64Array, t: Float64Array, miss: number, out: Uint8Array): void {
  const n = out.length;
  for (let j = 0; j < n; j++) {
    const v = col[j];
    let p = +(t[127] < v) << 7;
    p += +(t[p + 63] < v) << 6;
    p += +(t[p + 31] < v) << 5;
    p += +(t[p + 15] < v) << 4;
    p += +(t[p + 7] < v) << 3;
    p += +(t[p + 3] < v) << 2;
    p += +(t[p + 1] < v) << 1;
    p += +(t[p] < v);
    out[j] = p + +(v !== v) * (miss - p);
  }
}

function byteCodesOrdered(col: Float64Array, order: Int32Array, t: Float64Array, miss: number, out: Uint8Array): void {
  const n = out.length;
  for (let j = 0; j < n; j++) {
    const v = col[order[j]];
    let p = +(t[127] < v) << 7;
    p += +(t[p + 63] < v) << 6;
    p += +(t[p + 31] < v) << 5;
    p += +(t[p + 15] < v) << 4;
    p += +(t[p + 7] < v) << 3;
    p += +(t[p + 3] < v) << 2;
    p += +(t[p + 1] < v) << 1;
    p += +(t[p] < v);
    out[j] = p + +(v !== v) * (miss - p);
  }
}

/**
 * Codes of one column. `order` (optional) is a row permutation: output row j
 * reads input row order[j] (the trainer groups rows by class this way).
 */
export function binColumn(bins: FeatureBins, col: NumericColumn | CategoricalColumn, order?: Int32Array, alloc?: Allocate): CodeArray {
  const n = order ? order.length : col.length;
  const nCodes = codeCount(bins);
  const out = allocCodes(nCodes, n, alloc);
  if (bins.kind === 'numeric') {
    if (!isNumericColumn(col)) throw new TrainingError('bad-data', `Feature "${bins.name}" is numeric: its column must be a Float64Array`);
    const K = bins.cuts.length;
    const miss = K + 1;
    if (K <= 255 && out instanceof Uint8Array) {
      const t = new Float64Array(255).fill(Infinity);
      t.set(bins.cuts);
      if (order) byteCodesOrdered(col, order, t, miss, out);
      else byteCodes(col, t, miss, out);
    } else {
      const cuts = Float64Array.from(bins.cuts);
      for (let j = 0; j < n; j++) out[j] = numericCode(cuts, col[order ? order[j] : j]);
    }
    return out;
  }
  if (isNumericColumn(col)) throw new TrainingError('bad-data', `Feature "${bins.name}" is categorical: its column must hold strings or null`);
  const index = categoryIndex(bins);
  const other = bins.categories.length;
  const miss = other + 1;
  for (let j = 0; j < n; j++) {
    const v = col[order ? order[j] : j];
    out[j] = v === null || v === undefined || v === '' ? miss : (index.get(v) ?? other);
  }
  return out;
}

/** Map category -> code, built once per feature. */
export function categoryIndex(bins: CategoricalFeatureBins): Map<string, number> {
  const m = new Map<string, number>();
  bins.categories.forEach((c, i) => m.set(c, i));
  return m;
}

/** Codes of every feature, in binning order. */
export function applyBinning(binning: Binning, columns: FeatureColumns, order?: Int32Array, alloc?: Allocate): CodeArray[] {
  return binning.features.map((b) => {
    const col = columns[b.name];
    if (col === undefined) throw new TrainingError('bad-data', `Feature "${b.name}" has no column`);
    return binColumn(b, col, order, alloc);
  });
}
