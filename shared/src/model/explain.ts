/**
 * Explanations. Every stump reads one feature, so F is additive:
 * F(x) = sum_f g_f(x_f), g_f(x_f) = sum over f's stumps of alpha_t h_t(x).
 * The contribution of feature f is c_f = g_f(x_f) - E[g_f], E over the
 * training population; the c_f sum exactly to F(x) - E[F]. For an additive
 * model these are its Shapley values (Lundberg & Lee 2017).
 */
import { buildStepTables, stepIndex, type StepTable } from './compiled';
import type { Model } from './model-schema';
import { categoricalValue, numericStumpValue, numericValue } from './score';
import type { Row } from './types';

export interface StumpEffect {
  /** 1-based round of the stump. */
  round: number;
  /** alpha_t h_t(x). */
  effect: number;
  /** Readable rule of the stump side the row fell on, e.g. "amount > 610.00". */
  rule: string;
}

export interface Contribution {
  feature: string;
  featureIndex: number;
  /** The raw value read from the row (null = missing). */
  value: number | string | null;
  /** g_f(x_f). */
  g: number;
  /** E[g_f] over the training rows. */
  mean: number;
  /** c_f = g_f(x_f) - E[g_f]. */
  contribution: number;
  /** e.g. "amount 1,240.00 > 610.00: +0.38". */
  text: string;
  stumps: StumpEffect[];
}

export interface Explanation {
  /** F(x). */
  margin: number;
  /** E[F] over the training rows. */
  expectedMargin: number;
  /** One entry per feature used by the model, largest |contribution| first; they sum to F(x) - E[F]. */
  contributions: Contribution[];
}

/** Number in raw units: thousands separators, two decimals, more for small magnitudes. */
export function formatNumber(x: number): string {
  if (!Number.isFinite(x)) return String(x);
  const ax = Math.abs(x);
  let decimals = 2;
  if (ax > 0 && ax < 1) decimals = Math.min(6, Math.max(2, 2 - Math.floor(Math.log10(ax))));
  const fixed = ax.toFixed(decimals);
  const [int, frac] = fixed.split('.');
  const grouped = int.replace(/\B(?=(\d{3})+(?!\d))/g, ',');
  return `${x < 0 ? '-' : ''}${grouped}${frac ? `.${frac}` : ''}`;
}

export function formatSigned(x: number): string {
  return `${x >= 0 ? '+' : '-'}${Math.abs(x).toFixed(2)}`;
}

function numericCondition(name: string, v: number, cuts: Float64Array, cutText: (j: number) => string = (j) => formatNumber(cuts[j])): string {
  if (v !== v) return `${name} missing`;
  if (cuts.length === 0) return `${name} ${formatNumber(v)} present`;
  const j = stepIndex(cuts, v);
  if (j === 0) return `${name} ${formatNumber(v)} <= ${cutText(0)}`;
  if (j === cuts.length) return `${name} ${formatNumber(v)} > ${cutText(j - 1)}`;
  return `${name} ${formatNumber(v)} in (${cutText(j - 1)}, ${cutText(j)}]`;
}

function categoricalCondition(name: string, v: string | null, other: boolean): string {
  return v === null ? `${name} missing` : `${name} = ${v}${other ? ' (other)' : ''}`;
}

/** The cuts of every numeric step table as text, once per model. */
const cutTexts = new WeakMap<StepTable, string[]>();
function cutTextsOf(t: StepTable & { kind: 'numeric' }): string[] {
  let c = cutTexts.get(t);
  if (!c) {
    c = Array.from(t.cuts, formatNumber);
    cutTexts.set(t, c);
  }
  return c;
}

const tableCache = new WeakMap<Model, StepTable[]>();
function tablesOf(model: Model): StepTable[] {
  let t = tableCache.get(model);
  if (!t) {
    t = buildStepTables(model);
    tableCache.set(model, t);
  }
  return t;
}

/**
 * Explains one row `{ [featureName]: number | string | null | undefined }`:
 * the exact per-feature contributions, with the stumps behind each.
 */
/** Each stump's threshold as text, once per model: formatting it per row and stump was most of the cost of explaining a row. */
const thresholdTexts = new WeakMap<Model, string[]>();
function thresholdTextsOf(model: Model): string[] {
  let t = thresholdTexts.get(model);
  if (!t) {
    t = model.stumps.map((s) => (s.kind === 'numeric' && s.threshold !== null ? formatNumber(s.threshold) : ''));
    thresholdTexts.set(model, t);
  }
  return t;
}

export function explainRow(model: Model, row: Row): Explanation {
  const contributions: Contribution[] = [];
  const thresholds = thresholdTextsOf(model);
  let margin = 0;
  for (const table of tablesOf(model)) {
    const f = table.featureIndex;
    const mean = model.baseline.featureMeans[f];
    const stumpEffects: StumpEffect[] = [];
    let g = 0;
    let value: number | string | null;
    let cond: string;
    if (table.kind === 'numeric') {
      const v = numericValue(row, table.feature);
      value = v !== v ? null : v;
      model.stumps.forEach((s, t) => {
        if (s.featureIndex !== f || s.kind !== 'numeric') return;
        const h = numericStumpValue(s, v);
        const right = h === s.polarity;
        const e = s.alpha * h;
        g += e;
        let rule: string;
        if (s.threshold === null) rule = right ? `${s.feature} missing` : `${s.feature} present`;
        else if (v !== v) rule = `${s.feature} missing (sent ${right ? 'above' : 'below'} ${thresholds[t]})`;
        else rule = `${s.feature} ${right ? '>' : '<='} ${thresholds[t]}`;
        stumpEffects.push({ round: t + 1, effect: e, rule });
      });
      cond = numericCondition(table.feature, v, table.cuts);
    } else {
      const v = categoricalValue(row, table.feature);
      value = v;
      const C = table.categories.length;
      const idx = v === null ? C + 1 : table.categories.indexOf(v);
      const code = idx < 0 ? C : idx;
      model.stumps.forEach((s, t) => {
        if (s.featureIndex !== f || s.kind !== 'categorical') return;
        const hit = code === s.code;
        const e = s.alpha * (hit ? s.polarity : -s.polarity);
        g += e;
        const label = s.match === 'category' ? s.category : s.match === 'other' ? '(other)' : '(missing)';
        stumpEffects.push({ round: t + 1, effect: e, rule: `${s.feature} ${hit ? '=' : '!='} ${label}` });
      });
      cond = categoricalCondition(table.feature, v, code === C);
    }
    margin += g;
    const contribution = g - mean;
    contributions.push({
      feature: table.feature,
      featureIndex: f,
      value,
      g,
      mean,
      contribution,
      text: `${cond}: ${formatSigned(contribution)}`,
      stumps: stumpEffects,
    });
  }
  contributions.sort((a, b) => Math.abs(b.contribution) - Math.abs(a.contribution) || a.featureIndex - b.featureIndex);
  return { margin, expectedMargin: model.baseline.expectedF, contributions };
}

/** A reason code: one feature's contribution with its text, without the stumps behind it. */
export type Reason = Pick<Contribution, 'feature' | 'featureIndex' | 'value' | 'contribution' | 'text'>;

/**
 * The k largest contributions of a row, exactly as explainRow ranks and
 * words them, for the scoring hot path: g_f comes from the feature's step
 * table (the same sums of alpha_t h_t in the same order) instead of a walk
 * over every stump, and only the k kept contributions are put into words.
 */
export function topContributions(model: Model, row: Row, k: number): Reason[] {
  const tables = tablesOf(model);
  const cs: { t: StepTable; value: number | string | null; code: number; c: number }[] = [];
  for (const table of tables) {
    const mean = model.baseline.featureMeans[table.featureIndex];
    if (table.kind === 'numeric') {
      const v = numericValue(row, table.feature);
      const g = v !== v ? table.missing : table.values[stepIndex(table.cuts, v)];
      cs.push({ t: table, value: v !== v ? null : v, code: 0, c: g - mean });
    } else {
      const v = categoricalValue(row, table.feature);
      const C = table.categories.length;
      const idx = v === null ? C + 1 : table.categories.indexOf(v);
      const code = idx < 0 ? C : idx;
      cs.push({ t: table, value: v, code, c: table.values[code] - mean });
    }
  }
  cs.sort((a, b) => Math.abs(b.c) - Math.abs(a.c) || a.t.featureIndex - b.t.featureIndex);
  return cs.slice(0, Math.max(0, k)).map(({ t, value, code, c }) => {
    let cond: string;
    if (t.kind === 'numeric') {
      const texts = cutTextsOf(t);
      cond = numericCondition(t.feature, value === null ? NaN : (value as number), t.cuts, (j) => texts[j]);
    }
    else cond = categoricalCondition(t.feature, value as string | null, code === t.categories.length);
    return { feature: t.feature, featureIndex: t.featureIndex, value, contribution: c, text: `${cond}: ${formatSigned(c)}` };
  });
}

/** A feature's step function g_f (and its training mean) for plotting. */
export type StepFunction =
  | { kind: 'numeric'; feature: string; cuts: number[]; values: number[]; missing: number; mean: number }
  | { kind: 'categorical'; feature: string; levels: { label: string; value: number }[]; mean: number };

/** The compressed model: one step function per used feature. */
export function stepFunctions(model: Model): StepFunction[] {
  return tablesOf(model).map((t): StepFunction => {
    const mean = model.baseline.featureMeans[t.featureIndex];
    if (t.kind === 'numeric') {
      return { kind: 'numeric', feature: t.feature, cuts: [...t.cuts], values: [...t.values], missing: t.missing, mean };
    }
    const C = t.categories.length;
    return {
      kind: 'categorical',
      feature: t.feature,
      levels: [
        ...t.categories.map((label, c) => ({ label, value: t.values[c] })),
        { label: '(other)', value: t.values[C] },
        { label: '(missing)', value: t.values[C + 1] },
      ],
      mean,
    };
  });
}

export interface FeatureImportance {
  feature: string;
  /** sum of |alpha_t| over the feature's stumps. */
  importance: number;
  /** importance / sum over all features. */
  share: number;
  stumps: number;
}

/** Feature importance: sum |alpha| per feature, largest first (features with no stump omitted). */
export function featureImportance(model: Model): FeatureImportance[] {
  const imp = new Map<number, { importance: number; stumps: number }>();
  let total = 0;
  for (const s of model.stumps) {
    const e = imp.get(s.featureIndex) ?? { importance: 0, stumps: 0 };
    e.importance += Math.abs(s.alpha);
    e.stumps++;
    imp.set(s.featureIndex, e);
    total += Math.abs(s.alpha);
  }
  return [...imp.entries()]
    .map(([f, e]) => ({ feature: model.features[f].name, importance: e.importance, share: total > 0 ? e.importance / total : 0, stumps: e.stumps }))
    .sort((a, b) => b.importance - a.importance);
}
