/**
 * Evaluation metrics that fit the trade. Labels: any value > 0 is fraud
 * (so +1/-1 and 1/0 both work). Scores: higher = more likely fraud.
 */

function isPos(y: number): boolean {
  return y > 0;
}

function checkLengths(a: ArrayLike<unknown>, b: ArrayLike<unknown>, what: string): void {
  if (a.length !== b.length) throw new RangeError(`${what}: ${a.length} scores but ${b.length} labels`);
  if (a.length === 0) throw new RangeError(`${what}: no rows`);
}

/**
 * ROC AUC as the Mann-Whitney statistic, ties counted half:
 * AUC = (sum of fraud ranks - N+(N+ + 1)/2) / (N+ N-), with average ranks for ties
 * (Hanley & McNeil 1982). Same value as scikit-learn's roc_auc_score.
 */
export function rocAuc(scores: ArrayLike<number>, labels: ArrayLike<number>): number {
  checkLengths(scores, labels, 'rocAuc');
  const n = scores.length;
  const idx = Array.from({ length: n }, (_, i) => i).sort((a, b) => scores[a] - scores[b]);
  let nPos = 0;
  let rankSum = 0;
  let i = 0;
  while (i < n) {
    let j = i;
    while (j + 1 < n && scores[idx[j + 1]] === scores[idx[i]]) j++;
    const avgRank = (i + j) / 2 + 1;
    for (let k = i; k <= j; k++) {
      if (isPos(labels[idx[k]])) {
        nPos++;
        rankSum += avgRank;
      }
    }
    i = j + 1;
  }
  const nNeg = n - nPos;
  if (nPos === 0 || nNeg === 0) throw new RangeError('rocAuc: both classes are needed');
  return (rankSum - (nPos * (nPos + 1)) / 2) / (nPos * nNeg);
}

/** Indices sorted by score, highest first (stable on ties). */
function descending(scores: ArrayLike<number>): number[] {
  return Array.from({ length: scores.length }, (_, i) => i).sort((a, b) => scores[b] - scores[a] || a - b);
}

/**
 * Average precision, scikit-learn's definition (average_precision_score):
 * AP = sum_k (R_k - R_{k-1}) P_k over the distinct score thresholds, highest first,
 * tied scores entering together. A step function, not the trapezoid.
 */
export function averagePrecision(scores: ArrayLike<number>, labels: ArrayLike<number>): number {
  checkLengths(scores, labels, 'averagePrecision');
  const idx = descending(scores);
  let totalPos = 0;
  for (let i = 0; i < labels.length; i++) if (isPos(labels[i])) totalPos++;
  if (totalPos === 0) throw new RangeError('averagePrecision: no fraud rows');
  let tp = 0;
  let fp = 0;
  let prevRecall = 0;
  let ap = 0;
  let i = 0;
  while (i < idx.length) {
    let j = i;
    while (j < idx.length && scores[idx[j]] === scores[idx[i]]) {
      if (isPos(labels[idx[j]])) tp++;
      else fp++;
      j++;
    }
    const recall = tp / totalPos;
    const precision = tp / (tp + fp);
    ap += (recall - prevRecall) * precision;
    prevRecall = recall;
    i = j;
  }
  return ap;
}

/** Brier score: mean of (p_i - o_i)^2 with o_i = 1 for fraud, 0 otherwise (Brier 1950). */
export function brierScore(probabilities: ArrayLike<number>, labels: ArrayLike<number>): number {
  checkLengths(probabilities, labels, 'brierScore');
  let s = 0;
  for (let i = 0; i < labels.length; i++) {
    const d = probabilities[i] - (isPos(labels[i]) ? 1 : 0);
    s += d * d;
  }
  return s / labels.length;
}

export interface ReliabilityBin {
  lower: number;
  upper: number;
  count: number;
  meanPredicted: number;
  observedRate: number;
}

/**
 * Reliability table: `bins` equal-width probability bins on [0, 1]; a value
 * on an inner edge goes to the lower bin, as in scikit-learn's
 * calibration_curve(strategy="uniform"). Empty bins are kept with count 0 and NaN means.
 */
export function reliabilityTable(probabilities: ArrayLike<number>, labels: ArrayLike<number>, bins = 10): ReliabilityBin[] {
  checkLengths(probabilities, labels, 'reliabilityTable');
  const count = new Float64Array(bins);
  const sumP = new Float64Array(bins);
  const sumY = new Float64Array(bins);
  // Edges k * (1 / bins), as numpy.linspace computes them.
  const step = 1 / bins;
  for (let i = 0; i < labels.length; i++) {
    const p = probabilities[i];
    // number of inner edges q/bins strictly below p
    let b = Math.ceil(p * bins) - 1;
    if (b < 0) b = 0;
    if (b >= bins) b = bins - 1;
    // guard the rounding of p * bins against the exact edge values
    while (b > 0 && p <= b * step) b--;
    while (b < bins - 1 && p > (b + 1) * step) b++;
    count[b]++;
    sumP[b] += p;
    sumY[b] += isPos(labels[i]) ? 1 : 0;
  }
  return Array.from({ length: bins }, (_, b) => ({
    lower: b * step,
    upper: b + 1 === bins ? 1 : (b + 1) * step,
    count: count[b],
    meanPredicted: count[b] ? sumP[b] / count[b] : NaN,
    observedRate: count[b] ? sumY[b] / count[b] : NaN,
  }));
}

export interface ClassHistogram {
  /** Bin edges, length bins + 1; the last bin is closed on the right. */
  edges: number[];
  fraud: number[];
  legitimate: number[];
}

/** Histogram of a score by class over [min, max] (defaults: the data range). */
export function histogramByClass(
  values: ArrayLike<number>,
  labels: ArrayLike<number>,
  options: { bins?: number; min?: number; max?: number } = {},
): ClassHistogram {
  checkLengths(values, labels, 'histogramByClass');
  const bins = options.bins ?? 20;
  let lo = options.min ?? Infinity;
  let hi = options.max ?? -Infinity;
  if (options.min === undefined || options.max === undefined) {
    for (let i = 0; i < values.length; i++) {
      if (options.min === undefined) lo = Math.min(lo, values[i]);
      if (options.max === undefined) hi = Math.max(hi, values[i]);
    }
  }
  if (hi <= lo) hi = lo + 1;
  const edges = Array.from({ length: bins + 1 }, (_, k) => lo + ((hi - lo) * k) / bins);
  const fraud = new Array<number>(bins).fill(0);
  const legitimate = new Array<number>(bins).fill(0);
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (v < lo || v > hi || v !== v) continue;
    const b = Math.min(bins - 1, Math.floor(((v - lo) / (hi - lo)) * bins));
    (isPos(labels[i]) ? fraud : legitimate)[b]++;
  }
  return { edges, fraud, legitimate };
}

export interface AlertBudgetResult {
  /** Alerts per day k. */
  dailyBudget: number;
  days: number;
  alerts: number;
  fraudAlerted: number;
  fraudTotal: number;
  /** fraudAlerted / alerts. */
  precision: number;
  /** fraudAlerted / fraudTotal. */
  recall: number;
  /** Money caught: sum of alerted fraud amounts / sum of all fraud amounts (null without amounts). */
  amountRecall: number | null;
}

/**
 * Precision and recall at a daily alert budget: on each calendar day (UTC,
 * shifted by `utcOffsetMinutes`) the k highest-scoring transactions are
 * alerted (ties broken by row order). With `amounts`, also the
 * amount-weighted recall (share of fraud money in alerted transactions).
 *
 * @param timestamps epoch milliseconds, one per row
 */
export function alertBudget(
  scores: ArrayLike<number>,
  labels: ArrayLike<number>,
  timestamps: ArrayLike<number>,
  dailyBudget: number,
  options: { amounts?: ArrayLike<number>; utcOffsetMinutes?: number } = {},
): AlertBudgetResult {
  checkLengths(scores, labels, 'alertBudget');
  if (timestamps.length !== scores.length) throw new RangeError('alertBudget: one timestamp per row is needed');
  if (!(Number.isInteger(dailyBudget) && dailyBudget >= 0)) throw new RangeError('alertBudget: dailyBudget must be a whole number >= 0');
  const offset = (options.utcOffsetMinutes ?? 0) * 60_000;
  const byDay = new Map<number, number[]>();
  for (let i = 0; i < scores.length; i++) {
    const day = Math.floor((timestamps[i] + offset) / 86_400_000);
    let list = byDay.get(day);
    if (!list) byDay.set(day, (list = []));
    list.push(i);
  }
  const amounts = options.amounts;
  let alerts = 0;
  let fraudAlerted = 0;
  let fraudTotal = 0;
  let moneyAlerted = 0;
  let moneyTotal = 0;
  for (let i = 0; i < labels.length; i++) {
    if (isPos(labels[i])) {
      fraudTotal++;
      if (amounts) moneyTotal += amounts[i];
    }
  }
  for (const rows of byDay.values()) {
    rows.sort((a, b) => scores[b] - scores[a] || a - b);
    const k = Math.min(dailyBudget, rows.length);
    for (let j = 0; j < k; j++) {
      const i = rows[j];
      alerts++;
      if (isPos(labels[i])) {
        fraudAlerted++;
        if (amounts) moneyAlerted += amounts[i];
      }
    }
  }
  return {
    dailyBudget,
    days: byDay.size,
    alerts,
    fraudAlerted,
    fraudTotal,
    precision: alerts ? fraudAlerted / alerts : NaN,
    recall: fraudTotal ? fraudAlerted / fraudTotal : NaN,
    amountRecall: amounts ? (moneyTotal > 0 ? moneyAlerted / moneyTotal : NaN) : null,
  };
}

/** Amount-weighted recall at a score threshold: fraud money with score >= threshold / all fraud money. */
export function amountWeightedRecall(scores: ArrayLike<number>, labels: ArrayLike<number>, amounts: ArrayLike<number>, threshold: number): number {
  checkLengths(scores, labels, 'amountWeightedRecall');
  let caught = 0;
  let total = 0;
  for (let i = 0; i < labels.length; i++) {
    if (!isPos(labels[i])) continue;
    total += amounts[i];
    if (scores[i] >= threshold) caught += amounts[i];
  }
  return total > 0 ? caught / total : NaN;
}

export type PsiBand = 'stable' | 'watch' | 'act';

export interface PsiResult {
  psi: number;
  /** < 0.1 stable, 0.1-0.25 watch, > 0.25 act: rule of thumb, common practice (no single source). */
  band: PsiBand;
  /** Bin edges used (inner edges; the outer bins are open). */
  edges: number[];
  expectedShare: number[];
  actualShare: number[];
}

/** Rule-of-thumb PSI bands (common practice): < 0.1 stable, 0.1-0.25 watch, > 0.25 act. */
export function psiBand(psi: number): PsiBand {
  return psi < 0.1 ? 'stable' : psi <= 0.25 ? 'watch' : 'act';
}

/** Share floor for empty bins so the log stays finite (common practice). */
export const PSI_FLOOR = 1e-4;

/**
 * Population stability index PSI = sum_b (a_b - e_b) ln(a_b / e_b), a_b and
 * e_b the shares of the actual and expected populations in bin b.
 * `bins` is either a bin count (inner edges at the expected population's
 * quantiles, duplicates dropped) or explicit inner edges; a value on an edge
 * goes to the lower bin. NaN values form their own bin.
 */
export function psi(expected: ArrayLike<number>, actual: ArrayLike<number>, bins: number | number[] = 10): PsiResult {
  if (expected.length === 0 || actual.length === 0) throw new RangeError('psi: both populations must be non-empty');
  let edges: number[];
  if (Array.isArray(bins)) {
    edges = [...bins].sort((a, b) => a - b);
  } else {
    const sorted = Float64Array.from(expected).filter((v) => v === v).sort();
    edges = [];
    for (let q = 1; q < bins; q++) {
      if (sorted.length === 0) break;
      const e = sorted[Math.min(sorted.length - 1, Math.floor((q * sorted.length) / bins))];
      if (edges.length === 0 || e > edges[edges.length - 1]) edges.push(e);
    }
  }
  const share = (values: ArrayLike<number>) => {
    const c = new Float64Array(edges.length + 2);
    for (let i = 0; i < values.length; i++) {
      const v = values[i];
      if (v !== v) {
        c[edges.length + 1]++;
        continue;
      }
      let lo = 0;
      let hi = edges.length;
      while (lo < hi) {
        const mid = (lo + hi) >> 1;
        if (edges[mid] < v) lo = mid + 1;
        else hi = mid;
      }
      c[lo]++;
    }
    return Array.from(c, (x) => x / values.length);
  };
  const e = share(expected);
  const a = share(actual);
  let total = 0;
  for (let b = 0; b < e.length; b++) {
    if (e[b] === 0 && a[b] === 0) continue;
    const eb = Math.max(e[b], PSI_FLOOR);
    const ab = Math.max(a[b], PSI_FLOOR);
    total += (ab - eb) * Math.log(ab / eb);
  }
  return { psi: total, band: psiBand(total), edges, expectedShare: e, actualShare: a };
}

/** PSI of a categorical feature: one bin per category seen in either population (null = missing bin). */
export function psiCategorical(expected: ReadonlyArray<string | null>, actual: ReadonlyArray<string | null>): PsiResult {
  const keys = [...new Set([...expected, ...actual].map((v) => v ?? '\u0000missing'))].sort();
  const pos = new Map(keys.map((k, i) => [k, i]));
  const toCodes = (xs: ReadonlyArray<string | null>) => Float64Array.from(xs, (v) => pos.get(v ?? '\u0000missing')!);
  const edges = keys.slice(0, -1).map((_, i) => i + 0.5);
  return psi(toCodes(expected), toCodes(actual), edges);
}

export interface EvaluationReport {
  n: number;
  fraud: number;
  rocAuc: number;
  averagePrecision: number;
  brier: number;
  reliability: ReliabilityBin[];
  marginHistogram: ClassHistogram;
  normalizedMarginHistogram: ClassHistogram;
  probabilityHistogram: ClassHistogram;
  alertBudget: AlertBudgetResult | null;
}

/**
 * All headline metrics for one scored set.
 * @param scores margin F, normalised margin and probability per row (typed arrays of length n)
 * @param labels +1 / -1 (or 1 / 0)
 * @param options timestamps (epoch ms) + dailyBudget for the alert-budget figures, amounts for money caught
 */
export function evaluate(
  scores: { margin: ArrayLike<number>; normalizedMargin: ArrayLike<number>; probability: ArrayLike<number> },
  labels: ArrayLike<number>,
  options: { timestamps?: ArrayLike<number>; dailyBudget?: number; amounts?: ArrayLike<number>; bins?: number } = {},
): EvaluationReport {
  let fraud = 0;
  for (let i = 0; i < labels.length; i++) if (isPos(labels[i])) fraud++;
  return {
    n: labels.length,
    fraud,
    rocAuc: rocAuc(scores.margin, labels),
    averagePrecision: averagePrecision(scores.margin, labels),
    brier: brierScore(scores.probability, labels),
    reliability: reliabilityTable(scores.probability, labels, options.bins ?? 10),
    marginHistogram: histogramByClass(scores.margin, labels, { bins: 20 }),
    normalizedMarginHistogram: histogramByClass(scores.normalizedMargin, labels, { bins: 20, min: -1, max: 1 }),
    probabilityHistogram: histogramByClass(scores.probability, labels, { bins: 20, min: 0, max: 1 }),
    alertBudget:
      options.timestamps && options.dailyBudget !== undefined
        ? alertBudget(scores.margin, labels, options.timestamps, options.dailyBudget, { amounts: options.amounts })
        : null,
  };
}
