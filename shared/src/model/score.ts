/**
 * Plain scoring: F(x) = sum_t alpha_t h_t(x), one comparison per stump.
 * This is the reference the compiled scorer is checked against.
 *
 * Outputs per row:
 *   margin F(x);
 *   normalised margin F(x) / sum_t |alpha_t| in [-1, 1] (Schapire, Freund,
 *   Bartlett & Lee 1998), how decisive the vote is;
 *   probability: Platt scaling p = 1 / (1 + exp(-(a F + b))) when the model
 *   is calibrated (Platt 1999), else p = 1 / (1 + exp(-2F)), the population
 *   minimiser of the exponential loss (Friedman, Hastie & Tibshirani 2000).
 */
import { categoryIndex } from './binning';
import { ScoringInputError } from './errors';
import type { Model, Stump } from './model-schema';
import type { FeatureColumns, Row } from './types';

export interface Score {
  margin: number;
  normalizedMargin: number;
  probability: number;
}

export interface BatchScores {
  margin: Float64Array;
  normalizedMargin: Float64Array;
  probability: Float64Array;
}

/** Value of a numeric feature in a row: a number, NaN for missing. */
export function numericValue(row: Row, name: string): number {
  const v = row[name];
  if (v === null || v === undefined || v === '') return NaN;
  if (typeof v === 'number') return v;
  const x = Number(v);
  if (typeof v === 'string' && v.trim() !== '' && Number.isFinite(x)) return x;
  throw new ScoringInputError(`Feature "${name}" is numeric but the row holds ${JSON.stringify(v)}`);
}

/** Value of a categorical feature in a row: a string, null for missing. */
export function categoricalValue(row: Row, name: string): string | null {
  const v = row[name];
  if (v === null || v === undefined || v === '') return null;
  if (typeof v === 'number') return Number.isNaN(v) ? null : String(v);
  return v;
}

/** Per-model lookups the plain scorer needs (category -> code maps). */
interface Lookup {
  categoryCodes: (Map<string, number> | null)[];
}
const lookups = new WeakMap<Model, Lookup>();
function lookupOf(model: Model): Lookup {
  let l = lookups.get(model);
  if (!l) {
    l = { categoryCodes: model.binning.features.map((b) => (b.kind === 'categorical' ? categoryIndex(b) : null)) };
    lookups.set(model, l);
  }
  return l;
}

/** Code of a categorical value: kept category, C = other/unseen, C + 1 = missing. */
function categoricalCode(model: Model, f: number, v: string | null): number {
  const b = model.binning.features[f];
  if (b.kind !== 'categorical') throw new Error('not categorical');
  const C = b.categories.length;
  if (v === null) return C + 1;
  return lookupOf(model).categoryCodes[f]!.get(v) ?? C;
}

/** h_t(x) in {-1, +1} for a numeric value (NaN = missing). */
export function numericStumpValue(s: Extract<Stump, { kind: 'numeric' }>, v: number): number {
  let right: boolean;
  if (v !== v) right = s.missingRight;
  else right = s.threshold !== null && v > s.threshold;
  return right ? s.polarity : -s.polarity;
}

/** h_t(x) for each stump of the model, as a function of the row. */
export function stumpValues(model: Model, row: Row): Float64Array {
  const out = new Float64Array(model.stumps.length);
  const num = new Map<number, number>();
  const cat = new Map<number, number>();
  model.stumps.forEach((s, t) => {
    if (s.kind === 'numeric') {
      let v = num.get(s.featureIndex);
      if (v === undefined) {
        v = numericValue(row, s.feature);
        num.set(s.featureIndex, v);
      }
      out[t] = numericStumpValue(s, v);
    } else {
      let c = cat.get(s.featureIndex);
      if (c === undefined) {
        c = categoricalCode(model, s.featureIndex, categoricalValue(row, s.feature));
        cat.set(s.featureIndex, c);
      }
      out[t] = c === s.code ? s.polarity : -s.polarity;
    }
  });
  return out;
}

/** sum_t |alpha_t|, the normaliser of the margin. */
export function totalAlpha(model: Model): number {
  let s = 0;
  for (const st of model.stumps) s += Math.abs(st.alpha);
  return s;
}

/** Probability from a margin with the model's calibration (see module doc). */
export function probabilityFromMargin(model: Model, F: number): number {
  const c = model.calibration;
  const z = c ? c.a * F + c.b : 2 * F;
  return 1 / (1 + Math.exp(-z));
}

function finish(model: Model, F: number, sumAlpha: number): Score {
  return {
    margin: F,
    normalizedMargin: sumAlpha > 0 ? F / sumAlpha : 0,
    probability: probabilityFromMargin(model, F),
  };
}

/** Scores one row `{ [featureName]: number | string | null | undefined }`. */
export function scoreRow(model: Model, row: Row): Score {
  const h = stumpValues(model, row);
  let F = 0;
  for (let t = 0; t < h.length; t++) F += model.stumps[t].alpha * h[t];
  return finish(model, F, totalAlpha(model));
}

/** Staged margins: F after each round t = 1..T (Float64Array of length T). */
export function stagedMargins(model: Model, row: Row): Float64Array {
  const h = stumpValues(model, row);
  const out = new Float64Array(h.length);
  let F = 0;
  for (let t = 0; t < h.length; t++) {
    F += model.stumps[t].alpha * h[t];
    out[t] = F;
  }
  return out;
}

/** Staged scores: the full Score after each round, using the final model's calibration. */
export function stagedScores(model: Model, row: Row): Score[] {
  const staged = stagedMargins(model, row);
  let sumAlpha = 0;
  return Array.from(staged, (F, t) => {
    sumAlpha += Math.abs(model.stumps[t].alpha);
    return finish(model, F, sumAlpha);
  });
}

/** Number of rows of a column batch (all columns have the same length). */
export function batchLength(model: Model, columns: FeatureColumns): number {
  let n = -1;
  for (const f of model.features) {
    const c = columns[f.name];
    if (c === undefined) continue;
    if (n >= 0 && c.length !== n) throw new ScoringInputError(`Column "${f.name}" has ${c.length} rows, expected ${n}`);
    n = c.length;
  }
  if (n < 0) throw new ScoringInputError('The batch holds none of the model\'s features');
  return n;
}

/**
 * Scores many rows with the plain scorer: either an array of rows or a column
 * batch (Float64Array / (string | null)[] by feature name; a feature absent
 * from the batch is missing on every row). Returns typed arrays of length n.
 */
export function scoreBatch(model: Model, input: Row[] | FeatureColumns): BatchScores {
  const sumAlpha = totalAlpha(model);
  let margins: Float64Array;
  if (Array.isArray(input)) {
    margins = new Float64Array(input.length);
    input.forEach((row, i) => {
      const h = stumpValues(model, row);
      let F = 0;
      for (let t = 0; t < h.length; t++) F += model.stumps[t].alpha * h[t];
      margins[i] = F;
    });
  } else {
    const n = batchLength(model, input);
    margins = new Float64Array(n);
    for (const s of model.stumps) {
      const col = input[s.feature];
      if (s.kind === 'numeric') {
        if (col !== undefined && !(col instanceof Float64Array)) {
          throw new ScoringInputError(`Feature "${s.feature}" is numeric: its column must be a Float64Array`);
        }
        for (let i = 0; i < n; i++) margins[i] += s.alpha * numericStumpValue(s, col ? col[i] : NaN);
      } else {
        if (col instanceof Float64Array) throw new ScoringInputError(`Feature "${s.feature}" is categorical: its column must hold strings or null`);
        for (let i = 0; i < n; i++) {
          const v = col ? col[i] : null;
          const c = categoricalCode(model, s.featureIndex, v === undefined || v === '' ? null : v);
          margins[i] += s.alpha * (c === s.code ? s.polarity : -s.polarity);
        }
      }
    }
  }
  const normalizedMargin = new Float64Array(margins.length);
  const probability = new Float64Array(margins.length);
  for (let i = 0; i < margins.length; i++) {
    normalizedMargin[i] = sumAlpha > 0 ? margins[i] / sumAlpha : 0;
    probability[i] = probabilityFromMargin(model, margins[i]);
  }
  return { margin: margins, normalizedMargin, probability };
}
