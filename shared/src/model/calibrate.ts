/**
 * Platt scaling (Platt 1999): p = 1 / (1 + exp(-(a F + b))), fitted by
 * maximum likelihood on held-out margins with Platt's smoothed targets
 *   t+ = (N+ + 1) / (N+ + 2) for fraud rows, t- = 1 / (N- + 2) for legitimate rows,
 * solved by Newton's method with backtracking as in Lin, Lin & Weng (2007),
 * "A note on Platt's probabilistic outputs for support vector machines".
 * The same objective and start point as scikit-learn's `_sigmoid_calibration`
 * (which writes P = 1 / (1 + exp(A F + B)), so a = -A, b = -B).
 */
import { TrainingError } from './errors';
import type { Model, PlattCalibration } from './model-schema';

export interface PlattFit {
  a: number;
  b: number;
  iterations: number;
  n: number;
  positives: number;
}

/**
 * @param F margins F(x_i) of held-out rows (length n)
 * @param y labels, +1 (or any value > 0) for fraud, -1 / 0 for legitimate (length n)
 */
export function calibratePlatt(F: ArrayLike<number>, y: ArrayLike<number>): PlattFit {
  const n = F.length;
  if (n === 0 || y.length !== n) throw new TrainingError('bad-data', `Platt scaling needs equal, non-empty score and label arrays (got ${n} and ${y.length})`);
  let prior1 = 0;
  for (let i = 0; i < n; i++) if (y[i] > 0) prior1++;
  const prior0 = n - prior1;
  const hi = (prior1 + 1) / (prior1 + 2);
  const lo = 1 / (prior0 + 2);
  const t = new Float64Array(n);
  for (let i = 0; i < n; i++) t[i] = y[i] > 0 ? hi : lo;
  // In Lin-Lin-Weng's parametrisation P(fraud) = 1 / (1 + exp(A F + B)).
  let A = 0;
  let B = Math.log((prior0 + 1) / (prior1 + 1));
  const objective = (a: number, b: number) => {
    let s = 0;
    for (let i = 0; i < n; i++) {
      const z = F[i] * a + b;
      // Stable form of -[t log p + (1 - t) log(1 - p)].
      s += z >= 0 ? t[i] * z + Math.log1p(Math.exp(-z)) : (t[i] - 1) * z + Math.log1p(Math.exp(z));
    }
    return s;
  };
  let fval = objective(A, B);
  const sigma = 1e-12;
  let it = 0;
  for (; it < 200; it++) {
    let h11 = sigma;
    let h22 = sigma;
    let h21 = 0;
    let g1 = 0;
    let g2 = 0;
    for (let i = 0; i < n; i++) {
      const z = F[i] * A + B;
      let p: number;
      let q: number;
      if (z >= 0) {
        const e = Math.exp(-z);
        p = e / (1 + e);
        q = 1 / (1 + e);
      } else {
        const e = Math.exp(z);
        p = 1 / (1 + e);
        q = e / (1 + e);
      }
      const d2 = p * q;
      h11 += F[i] * F[i] * d2;
      h22 += d2;
      h21 += F[i] * d2;
      const d1 = t[i] - p;
      g1 += F[i] * d1;
      g2 += d1;
    }
    if (Math.abs(g1) < 1e-10 * Math.max(1, n) && Math.abs(g2) < 1e-10 * Math.max(1, n)) break;
    const det = h11 * h22 - h21 * h21;
    const dA = -(h22 * g1 - h21 * g2) / det;
    const dB = -(-h21 * g1 + h11 * g2) / det;
    const gd = g1 * dA + g2 * dB;
    let step = 1;
    let moved = false;
    while (step >= 1e-12) {
      const nA = A + step * dA;
      const nB = B + step * dB;
      const nf = objective(nA, nB);
      if (nf < fval + 1e-4 * step * gd) {
        A = nA;
        B = nB;
        fval = nf;
        moved = true;
        break;
      }
      step /= 2;
    }
    if (!moved) break;
  }
  return { a: -A, b: -B, iterations: it, n, positives: prior1 };
}

/** A copy of the model with Platt calibration attached. */
export function withCalibration(model: Model, fit: PlattFit, fittedOn: PlattCalibration['fittedOn']): Model {
  return { ...model, calibration: { method: 'platt', a: fit.a, b: fit.b, fittedOn, n: fit.n, positives: fit.positives } };
}
