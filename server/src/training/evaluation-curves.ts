import type { CurvePoint, Curves } from '@shared/api/models';

/** Curves are stored with every version; a few hundred points draw them faithfully. */
export const CURVE_POINTS = 300;

/**
 * ROC and precision-recall curves of one scored set, one point per distinct
 * score (tied scores enter together, so a tie is one diagonal ROC segment and
 * the trapezoid area equals the Mann-Whitney AUC; Fawcett 2006, "An
 * introduction to ROC analysis", algorithm 2). Rows are ranked by the margin;
 * each point carries the calibrated probability at which it is reached.
 *
 * @param margin F(x) per row (ranking), length n
 * @param probability calibrated p per row (reported threshold), length n
 * @param labels +1 fraud / -1 legitimate, length n
 */
export function rocPrCurves(
  margin: ArrayLike<number>,
  probability: ArrayLike<number>,
  labels: ArrayLike<number>,
  maxPoints = CURVE_POINTS,
): Curves {
  const full = fullCurves(margin, probability, labels);
  return { roc: downSample(full.roc, maxPoints), pr: downSample(full.pr, maxPoints), pointsBefore: full.roc.length };
}

/** Every point, before down-sampling (tests compare its areas with the metric functions). */
export function fullCurves(margin: ArrayLike<number>, probability: ArrayLike<number>, labels: ArrayLike<number>): { roc: CurvePoint[]; pr: CurvePoint[] } {
  const n = labels.length;
  if (margin.length !== n || probability.length !== n) throw new RangeError('curves: one margin, probability and label per row');
  let P = 0;
  for (let i = 0; i < n; i++) if (labels[i] > 0) P++;
  const N = n - P;
  const order = Array.from({ length: n }, (_, i) => i).sort((a, b) => margin[b] - margin[a] || a - b);
  const roc: CurvePoint[] = [{ x: 0, y: 0, threshold: 1 }];
  const pr: CurvePoint[] = [];
  let tp = 0;
  let fp = 0;
  let i = 0;
  while (i < n) {
    const m = margin[order[i]];
    let lowestP = probability[order[i]];
    while (i < n && margin[order[i]] === m) {
      if (labels[order[i]] > 0) tp++;
      else fp++;
      lowestP = Math.min(lowestP, probability[order[i]]);
      i++;
    }
    roc.push({ x: N > 0 ? fp / N : 0, y: P > 0 ? tp / P : 0, threshold: lowestP });
    pr.push({ x: P > 0 ? tp / P : 0, y: tp / (tp + fp), threshold: lowestP });
  }
  return { roc, pr };
}

/** At most `max` points, evenly spaced along the curve, first and last always kept. */
export function downSample(points: CurvePoint[], max: number): CurvePoint[] {
  if (points.length <= max) return points;
  const out: CurvePoint[] = [];
  for (let k = 0; k < max; k++) out.push(points[Math.round((k * (points.length - 1)) / (max - 1))]);
  return out;
}

/** Area under a curve of points sorted by x, by trapezoids. */
export function trapezoidArea(points: CurvePoint[]): number {
  let a = 0;
  for (let k = 1; k < points.length; k++) a += ((points[k].x - points[k - 1].x) * (points[k].y + points[k - 1].y)) / 2;
  return a;
}
