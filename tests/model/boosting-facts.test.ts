/**
 * Published facts about AdaBoost, checked on the engine's output (the weights
 * are recomputed here from the staged margins, not read from the trainer).
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { scoreBatch, stagedMargins, trainModel, type TrainResult } from '../../shared/src/model';
import { breastCancerSet, rowOf } from './helpers/data';
import { breastCancerData } from './helpers/python';

let set: ReturnType<typeof breastCancerSet>;
let fit: TrainResult;
const ROUNDS = 30;

beforeAll(() => {
  // Real data: the Wisconsin breast-cancer set as scikit-learn ships it (UCI; Street, Wolberg & Mangasarian 1993).
  set = breastCancerSet(breastCancerData());
  fit = trainModel(set, { rounds: ROUNDS });
}, 120_000);

describe('AdaBoost facts (breast-cancer data, quantile bins, uniform start)', () => {
  it('the chosen stump has weighted error exactly 1/2 under the next weights (Freund & Schapire 1997)', () => {
    const n = set.labels.length;
    const staged = Array.from({ length: n }, (_, i) => stagedMargins(fit.model, rowOf(set.columns, i)));
    for (let t = 0; t < 10; t++) {
      // d^{t+1}_i proportional to exp(-y_i F_t(x_i)) for a uniform start.
      const d = Float64Array.from(staged, (s, i) => Math.exp(-set.labels[i] * s[t]));
      const total = d.reduce((a, b) => a + b, 0);
      const stump = fit.model.stumps[t];
      let err = 0;
      for (let i = 0; i < n; i++) {
        const h = (t === 0 ? staged[i][0] : staged[i][t] - staged[i][t - 1]) / stump.alpha;
        if (Math.sign(h) !== set.labels[i]) err += d[i] / total;
      }
      expect(Math.abs(err - 0.5)).toBeLessThan(1e-12);
    }
  }, 60_000);

  it('training exponential loss equals prod_t Z_t (Freund & Schapire 1997, Theorem 6 proof)', () => {
    const s = scoreBatch(fit.model, set.columns);
    const n = set.labels.length;
    let loss = 0;
    for (let i = 0; i < n; i++) loss += Math.exp(-set.labels[i] * s.margin[i]) / n;
    const prodZ = fit.trace.reduce((p, r) => p * r.Z, 1);
    expect(Math.abs(loss - prodZ) / prodZ).toBeLessThan(1e-10);
    expect(Math.abs(fit.trace[ROUNDS - 1].trainLoss - prodZ) / prodZ).toBeLessThan(1e-12);
    // Z_t = sqrt(1 - r_t^2) at a full step.
    for (const r of fit.trace) expect(Math.abs(r.Z - Math.sqrt(1 - r.edge * r.edge))).toBeLessThan(1e-12);
  });

  it('training error <= prod_t Z_t after every round (Freund & Schapire 1997, Theorem 6)', () => {
    const s = scoreBatch(fit.model, set.columns);
    let wrong = 0;
    s.margin.forEach((F, i) => {
      if ((F > 0 ? 1 : -1) !== set.labels[i]) wrong++;
    });
    expect(wrong / set.labels.length).toBe(fit.trace[ROUNDS - 1].trainError);
    let prodZ = 1;
    for (const r of fit.trace) {
      prodZ *= r.Z;
      expect(r.trainError).toBeLessThanOrEqual(prodZ);
    }
  });
});

describe('the small worked example: 10 points, the first stump errs on 3', () => {
  // Values from the published toy example (eps_1 = 0.30, alpha_1 = 0.42 rounded; from memory);
  // 0.4236 = 1/2 ln(0.7 / 0.3), and the re-weighting 1/6 and 1/14 follow from it.
  // The ten points below only realise "best first stump errs on 3 of 10" on one axis.
  const x = Float64Array.from([1, 2, 3, 4, 5, 6, 7, 8, 9, 10]);
  const y = Int8Array.from([1, 1, 1, 1, -1, -1, -1, 1, 1, 1]);
  const run = () => trainModel({ features: [{ name: 'x', kind: 'numeric' }], columns: { x }, labels: y }, { rounds: 2, exact: true });

  it('eps_1 = 0.30 and alpha_1 = 0.4236', () => {
    const { trace } = run();
    expect(trace[0].weightedError).toBeCloseTo(0.3, 12);
    expect(trace[0].alpha).toBeCloseTo(0.4236, 4);
    expect(trace[0].alpha).toBeCloseTo(0.5 * Math.log(0.7 / 0.3), 12);
  });

  it('after round 1 the 3 misclassified weights are 1/6 each and the 7 others 1/14 each', () => {
    const { model } = run();
    const F1 = Array.from(x, (v) => stagedMargins(model, { x: v })[0]);
    const u = F1.map((F, i) => Math.exp(-y[i] * F));
    const total = u.reduce((a, b) => a + b, 0);
    const d = u.map((v) => v / total);
    const wrong = d.filter((_, i) => Math.sign(F1[i]) !== y[i]);
    const right = d.filter((_, i) => Math.sign(F1[i]) === y[i]);
    expect(wrong).toHaveLength(3);
    for (const w of wrong) expect(w).toBeCloseTo(1 / 6, 12);
    for (const w of right) expect(w).toBeCloseTo(1 / 14, 12);
  });
});
