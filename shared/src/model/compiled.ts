/**
 * Compiled scorer for the hot path. F is additive over features,
 * F(x) = sum_f g_f(x_f), and each g_f is a step function that changes only at
 * the thresholds the model's stumps on f use. Folding the stumps gives one
 * step table per feature (flat typed arrays), so a row costs one short binary
 * search per used numeric feature and one lookup per categorical feature,
 * instead of one comparison per round. Equal to the plain scorer up to float
 * rounding of the re-ordered sums (tests check 1e-12).
 */
import { categoryIndex } from './binning';
import { ScoringInputError } from './errors';
import type { Model } from './model-schema';
import { batchLength, categoricalValue, numericValue, probabilityFromMargin, totalAlpha } from './score';
import type { FeatureColumns, Row } from './types';

/** g_f for a numeric feature: values[j] on interval j = #{cuts < x}; `missing` when x is missing. */
export interface NumericStepTable {
  kind: 'numeric';
  feature: string;
  featureIndex: number;
  /** Used thresholds, strictly increasing (raw units). */
  cuts: Float64Array;
  /** values.length = cuts.length + 1. */
  values: Float64Array;
  missing: number;
}

/** g_f for a categorical feature: values by code (kept categories, then "other", then missing). */
export interface CategoricalStepTable {
  kind: 'categorical';
  feature: string;
  featureIndex: number;
  categories: string[];
  /** values.length = categories.length + 2. */
  values: Float64Array;
}

export type StepTable = NumericStepTable | CategoricalStepTable;

/** One step table per feature that at least one stump uses, in model feature order. */
export function buildStepTables(model: Model): StepTable[] {
  const tables: StepTable[] = [];
  model.features.forEach((feat, f) => {
    const stumps = model.stumps.filter((s) => s.featureIndex === f);
    if (stumps.length === 0) return;
    const bins = model.binning.features[f];
    if (bins.kind === 'numeric') {
      const used = [...new Set(stumps.flatMap((s) => (s.kind === 'numeric' && s.threshold !== null ? [s.threshold] : [])))].sort(
        (a, b) => a - b,
      );
      const cuts = Float64Array.from(used);
      const values = new Float64Array(cuts.length + 1);
      let missing = 0;
      for (const s of stumps) {
        if (s.kind !== 'numeric') continue;
        const a = s.alpha * s.polarity;
        missing += s.missingRight ? a : -a;
        if (s.threshold === null) {
          for (let j = 0; j < values.length; j++) values[j] -= a;
        } else {
          const k = used.indexOf(s.threshold);
          for (let j = 0; j < values.length; j++) values[j] += j > k ? a : -a;
        }
      }
      tables.push({ kind: 'numeric', feature: feat.name, featureIndex: f, cuts, values, missing });
    } else {
      const values = new Float64Array(bins.categories.length + 2);
      for (const s of stumps) {
        if (s.kind !== 'categorical') continue;
        const a = s.alpha * s.polarity;
        for (let c = 0; c < values.length; c++) values[c] += c === s.code ? a : -a;
      }
      tables.push({ kind: 'categorical', feature: feat.name, featureIndex: f, categories: bins.categories, values });
    }
  });
  return tables;
}

/** Interval index #{cuts < v} for a present value. */
export function stepIndex(cuts: Float64Array, v: number): number {
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
 * out[r] += g_f(col[r]) for one numeric feature: `cuts` holds the P - 1 used
 * thresholds padded with +Inf (P a power of two), `vals` the P step values
 * followed by the value for a missing input. Up to 7 cuts the step index is
 * a sum of independent comparisons with the cuts held in locals (#cuts < v);
 * larger tables use a branch-free binary search. NaN compares false with
 * every cut, and its slot is picked arithmetically (no unpredictable branch).
 */
function addNumericSteps(out: Float64Array, col: Float64Array, cuts: Float64Array, vals: Float64Array, P: number): void {
  const n = out.length;
  if (P === 1) {
    for (let r = 0; r < n; r++) {
      const v = col[r];
      out[r] += vals[+(v !== v)];
    }
    return;
  }
  if (P === 2) {
    const c0 = cuts[0];
    for (let r = 0; r < n; r++) {
      const v = col[r];
      const p = +(c0 < v);
      out[r] += vals[p + +(v !== v) * (2 - p)];
    }
  } else if (P === 4) {
    const c0 = cuts[0];
    const c1 = cuts[1];
    const c2 = cuts[2];
    for (let r = 0; r < n; r++) {
      const v = col[r];
      const p = +(c0 < v) + +(c1 < v) + +(c2 < v);
      out[r] += vals[p + +(v !== v) * (4 - p)];
    }
  } else if (P === 8) {
    const c0 = cuts[0];
    const c1 = cuts[1];
    const c2 = cuts[2];
    const c3 = cuts[3];
    const c4 = cuts[4];
    const c5 = cuts[5];
    const c6 = cuts[6];
    for (let r = 0; r < n; r++) {
      const v = col[r];
      const p = +(c0 < v) + +(c1 < v) + +(c2 < v) + +(c3 < v) + +(c4 < v) + +(c5 < v) + +(c6 < v);
      out[r] += vals[p + +(v !== v) * (8 - p)];
    }
  } else if (P === 16) {
    for (let r = 0; r < n; r++) {
      const v = col[r];
      let p = +(cuts[7] < v) << 3;
      p += +(cuts[p + 3] < v) << 2;
      p += +(cuts[p + 1] < v) << 1;
      p += +(cuts[p] < v);
      out[r] += vals[p + +(v !== v) * (16 - p)];
    }
  } else {
    for (let r = 0; r < n; r++) {
      const v = col[r];
      let p = 0;
      for (let step = P >> 1; step > 0; step >>= 1) p += +(cuts[p + step - 1] < v) * step;
      out[r] += vals[p + +(v !== v) * (P - p)];
    }
  }
}

export interface CompiledScorer {
  /** The step tables, for plotting or inspection. */
  readonly tables: StepTable[];
  /** sum_t |alpha_t|. */
  readonly totalAlpha: number;
  /** F(x) for one row. */
  score(row: Row): number;
  /** F for a column batch (Float64Array / (string | null)[] by name; absent feature = missing). */
  scoreColumns(columns: FeatureColumns): Float64Array;
  /** Calibrated probability for a margin. */
  probability(F: number): number;
}

/**
 * Folds the model into step tables. Numeric tables are padded to 2^m - 1 cuts
 * with +Infinity so the batch search runs a fixed number of steps.
 */
export function compileModel(model: Model): CompiledScorer {
  const tables = buildStepTables(model);
  const numeric = tables.filter((t): t is NumericStepTable => t.kind === 'numeric');
  const categorical = tables.filter((t): t is CategoricalStepTable => t.kind === 'categorical');
  // Per feature: P - 1 cuts padded with +Inf (P a power of two), and P values followed by the missing value.
  const padLen = numeric.map((t) => {
    let p = 1;
    while (p < t.cuts.length + 1) p <<= 1;
    return p;
  });
  const cutTables = numeric.map((t, i) => {
    const c = new Float64Array(padLen[i] - 1).fill(Infinity);
    c.set(t.cuts);
    return c;
  });
  const valueTables = numeric.map((t, i) => {
    const v = new Float64Array(padLen[i] + 1);
    v.set(t.values);
    // Padded value slots are never reached (their cut is +Inf), fill for safety.
    v.fill(t.values[t.values.length - 1], t.values.length, padLen[i]);
    v[padLen[i]] = t.missing;
    return v;
  });
  const catMaps = categorical.map((t) => categoryIndex({ name: t.feature, kind: 'categorical', categories: t.categories, pooledCategories: 0 }));
  const sumAlpha = totalAlpha(model);

  const searchPadded = (i: number, v: number): number => {
    const cuts = cutTables[i];
    let step = padLen[i] >> 1;
    let p = 0;
    while (step > 0) {
      if (cuts[p + step - 1] < v) p += step;
      step >>= 1;
    }
    return p;
  };

  return {
    tables,
    totalAlpha: sumAlpha,
    probability: (F: number) => probabilityFromMargin(model, F),
    score(row: Row): number {
      let F = 0;
      for (let i = 0; i < numeric.length; i++) {
        const v = numericValue(row, numeric[i].feature);
        F += valueTables[i][v !== v ? padLen[i] : searchPadded(i, v)];
      }
      for (let i = 0; i < categorical.length; i++) {
        const t = categorical[i];
        const v = categoricalValue(row, t.feature);
        const C = t.categories.length;
        F += t.values[v === null ? C + 1 : (catMaps[i].get(v) ?? C)];
      }
      return F;
    },
    scoreColumns(columns: FeatureColumns): Float64Array {
      const n = batchLength(model, columns);
      const out = new Float64Array(n);
      for (let i = 0; i < numeric.length; i++) {
        const t = numeric[i];
        const col = columns[t.feature];
        if (col === undefined) {
          const miss = valueTables[i][padLen[i]];
          for (let r = 0; r < n; r++) out[r] += miss;
          continue;
        }
        if (!(col instanceof Float64Array)) throw new ScoringInputError(`Feature "${t.feature}" is numeric: its column must be a Float64Array`);
        addNumericSteps(out, col, cutTables[i], valueTables[i], padLen[i]);
      }
      for (let i = 0; i < categorical.length; i++) {
        const t = categorical[i];
        const col = columns[t.feature];
        const C = t.categories.length;
        if (col === undefined) {
          for (let r = 0; r < n; r++) out[r] += t.values[C + 1];
          continue;
        }
        if (col instanceof Float64Array) throw new ScoringInputError(`Feature "${t.feature}" is categorical: its column must hold strings or null`);
        const map = catMaps[i];
        const vals = t.values;
        for (let r = 0; r < n; r++) {
          const v = col[r];
          out[r] += vals[v === null || v === undefined || v === '' ? C + 1 : (map.get(v) ?? C)];
        }
      }
      return out;
    },
  };
}
