/**
 * Metrics and Platt scaling against scikit-learn 1.2 (Debian python3-sklearn)
 * and pandas on the same score arrays (tests/reference/metrics_reference.py).
 * Scores come from a model trained on half of the breast-cancer data
 * (UCI; Street, Wolberg & Mangasarian 1993) and scored on the other half.
 */
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import {
  alertBudget,
  averagePrecision,
  brierScore,
  calibratePlatt,
  psi,
  psiBand,
  psiCategorical,
  reliabilityTable,
  rocAuc,
  scoreBatch,
  trainModel,
  withCalibration,
} from '../../shared/src/model';
import { breastCancerSet } from './helpers/data';
import { readJson, runReference, breastCancerData, tempDir, writeJson } from './helpers/python';

interface Ref {
  roc_auc: number;
  average_precision: number;
  brier: number;
  platt_A: number;
  platt_B: number;
  calibration_true: number[];
  calibration_pred: number[];
  budget_alerts: number;
  budget_precision: number;
  budget_recall: number;
  budget_amount_recall: number;
}

const cases: { name: string; scores: Float64Array; probs: Float64Array; labels: Int8Array; platt: { F: Float64Array; y: Int8Array }; days: number[]; amounts: number[]; ref: Ref }[] = [];

beforeAll(() => {
  const bc = breastCancerSet(breastCancerData());
  const n = bc.labels.length;
  // Interleaved halves: even rows train, odd rows are held out.
  const even = Int32Array.from({ length: Math.ceil(n / 2) }, (_, i) => 2 * i);
  const odd = Int32Array.from({ length: Math.floor(n / 2) }, (_, i) => 2 * i + 1);
  const pick = (idx: Int32Array) => {
    const cols: typeof bc.columns = {};
    for (const [k, c] of Object.entries(bc.columns)) cols[k] = Float64Array.from(idx, (i) => (c as Float64Array)[i]);
    return { columns: cols, labels: Int8Array.from(idx, (i) => bc.labels[i]) };
  };
  const train = pick(even);
  const test = pick(odd);
  const { model } = trainModel({ features: bc.features, ...train }, { rounds: 25, shrinkage: 0.5 });
  const heldF = scoreBatch(model, test.columns).margin;
  const fit = calibratePlatt(heldF, test.labels);
  const calibrated = withCalibration(model, fit, 'caller');
  const s = scoreBatch(calibrated, test.columns);
  const days = Array.from(test.labels, (_, i) => i % 7);
  // Amount-like weights from a real column (mean area), so money-weighted recall has non-uniform weights.
  const amounts = Array.from(test.columns['mean area'] as Float64Array);
  const t = tempDir('edgecase-metrics-');
  const variants = [
    { name: 'margins', scores: s.margin },
    // Rounding the normalised margin creates many ties: tie handling must match too.
    { name: 'rounded (ties)', scores: Float64Array.from(s.normalizedMargin, (v) => Math.round(v * 10) / 10) },
  ];
  try {
    for (const v of variants) {
      const inPath = join(t.dir, 'in.json');
      const outPath = join(t.dir, 'out.json');
      writeJson(inPath, {
        labels: Array.from(test.labels),
        scores: Array.from(v.scores),
        probabilities: Array.from(s.probability),
        platt_margins: Array.from(heldF),
        platt_labels: Array.from(test.labels),
        days,
        amounts,
        budget: 12,
      });
      runReference('metrics_reference.py', [inPath, outPath]);
      cases.push({ name: v.name, scores: v.scores, probs: s.probability, labels: test.labels, platt: { F: heldF, y: test.labels }, days, amounts, ref: readJson<Ref>(outPath) });
    }
  } finally {
    t.cleanup();
  }
}, 120_000);

describe('metrics vs sklearn.metrics', () => {
  it('roc_auc_score, average_precision_score, brier_score_loss to 1e-9', () => {
    for (const c of cases) {
      expect(Math.abs(rocAuc(c.scores, c.labels) - c.ref.roc_auc)).toBeLessThan(1e-9);
      expect(Math.abs(averagePrecision(c.scores, c.labels) - c.ref.average_precision)).toBeLessThan(1e-9);
      expect(Math.abs(brierScore(c.probs, c.labels) - c.ref.brier)).toBeLessThan(1e-9);
    }
  });

  it('Platt parameters match sklearn.calibration._sigmoid_calibration (1e-4; a = -A, b = -B)', () => {
    const c = cases[0];
    const fit = calibratePlatt(c.platt.F, c.platt.y);
    expect(Math.abs(fit.a - -c.ref.platt_A)).toBeLessThan(1e-4);
    expect(Math.abs(fit.b - -c.ref.platt_B)).toBeLessThan(1e-4);
  });

  it('reliability table matches sklearn.calibration.calibration_curve on its non-empty bins', () => {
    const c = cases[0];
    const table = reliabilityTable(c.probs, c.labels, 10).filter((b) => b.count > 0);
    expect(table.map((b) => b.observedRate)).toHaveLength(c.ref.calibration_true.length);
    table.forEach((b, i) => {
      expect(Math.abs(b.observedRate - c.ref.calibration_true[i])).toBeLessThan(1e-12);
      expect(Math.abs(b.meanPredicted - c.ref.calibration_pred[i])).toBeLessThan(1e-12);
    });
  });

  it('daily alert budget: precision, recall and money caught match a pandas group-by top-k', () => {
    for (const c of cases) {
      const ts = c.days.map((d) => Date.UTC(2025, 0, 1 + d, 12));
      const r = alertBudget(c.scores, c.labels, ts, 12, { amounts: c.amounts });
      expect(r.alerts).toBe(c.ref.budget_alerts);
      expect(Math.abs(r.precision - c.ref.budget_precision)).toBeLessThan(1e-12);
      expect(Math.abs(r.recall - c.ref.budget_recall)).toBeLessThan(1e-12);
      expect(Math.abs(r.amountRecall! - c.ref.budget_amount_recall)).toBeLessThan(1e-12);
    }
  });
});

describe('PSI', () => {
  it('is zero for identical populations and symmetric in its two terms', () => {
    const a = Float64Array.from({ length: 1000 }, (_, i) => Math.sin(i) * 10);
    expect(psi(a, a).psi).toBe(0);
    const shifted = a.map((v) => v + 3);
    const r = psi(a, shifted, 10);
    // PSI = sum (a - e) ln(a / e) >= 0, equal to the symmetrised KL divergence of the binned shares.
    let kl = 0;
    r.expectedShare.forEach((e, b) => {
      const x = Math.max(r.actualShare[b], 1e-4);
      const y = Math.max(e, 1e-4);
      if (r.actualShare[b] || e) kl += x * Math.log(x / y) + y * Math.log(y / x);
    });
    expect(r.psi).toBeCloseTo(kl, 12);
    expect(r.psi).toBeGreaterThan(0.25);
  });

  it('bands are the rule of thumb (common practice): < 0.1 stable, 0.1-0.25 watch, > 0.25 act', () => {
    expect(psiBand(0.05)).toBe('stable');
    expect(psiBand(0.1)).toBe('watch');
    expect(psiBand(0.25)).toBe('watch');
    expect(psiBand(0.2501)).toBe('act');
  });

  it('categorical PSI compares category shares', () => {
    const e = ['a', 'a', 'b', 'b', null];
    expect(psiCategorical(e, e).psi).toBe(0);
    // Worked by hand: shares a .4/.2, b .4/.4, missing .2/.4 -> (.2-.4)ln(.5) + 0 + (.4-.2)ln(2) = 0.4 ln 2.
    expect(psiCategorical(e, ['a', 'b', 'b', null, null]).psi).toBeCloseTo(0.4 * Math.log(2), 12);
  });
});
