/**
 * ROC and PR curve points stored with each version, checked against
 * scikit-learn's roc_curve / precision_recall_curve on the same scores
 * (tests/reference/curves_reference.py), and their areas against the
 * engine's own AUC and average precision. Scores: an invented, seeded fixture
 * with ties.
 */
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { averagePrecision, rocAuc } from '../../../shared/src/model';
import { downSample, fullCurves, rocPrCurves, trapezoidArea } from '../../../server/src/training/evaluation-curves';
import { readJson, runReference, tempDir, writeJson } from '../../model/helpers/python';

function fixture(n: number) {
  let s = 12345;
  const rand = () => ((s = (s * 1103515245 + 12345) % 2147483648) / 2147483648);
  const labels: number[] = [];
  const margin: number[] = [];
  for (let i = 0; i < n; i++) {
    const fraud = rand() < 0.15;
    labels.push(fraud ? 1 : -1);
    // Rounded to a grid so many scores tie, as stump ensembles produce.
    margin.push(Math.round(((fraud ? 0.8 : 0) + rand() * 2 - 1) * 20) / 20);
  }
  const probability = margin.map((m) => 1 / (1 + Math.exp(-2 * m)));
  return { labels, margin, probability };
}

describe('evaluation curves', () => {
  const { labels, margin, probability } = fixture(2000);
  const full = fullCurves(margin, probability, labels);

  it('match scikit-learn point for point', () => {
    const t = tempDir('edgecase-curves-');
    try {
      writeJson(join(t.dir, 'in.json'), { labels, scores: margin });
      runReference('curves_reference.py', [join(t.dir, 'in.json'), join(t.dir, 'out.json')]);
      const ref = readJson<{ roc: [number, number][]; pr: [number, number][] }>(join(t.dir, 'out.json'));
      expect(full.roc.length).toBe(ref.roc.length);
      full.roc.forEach((p, k) => {
        expect(p.x).toBeCloseTo(ref.roc[k][0], 12);
        expect(p.y).toBeCloseTo(ref.roc[k][1], 12);
      });
      expect(full.pr.length).toBe(ref.pr.length);
      full.pr.forEach((p, k) => {
        expect(p.x).toBeCloseTo(ref.pr[k][0], 12);
        expect(p.y).toBeCloseTo(ref.pr[k][1], 12);
      });
    } finally {
      t.cleanup();
    }
  }, 60_000);

  it('the trapezoid area under the ROC points is the AUC; the PR steps sum to average precision', () => {
    // Fawcett 2006: with tied scores entering together, the trapezoid area equals the Mann-Whitney AUC.
    expect(trapezoidArea(full.roc)).toBeCloseTo(rocAuc(margin, labels), 12);
    let ap = 0;
    let prev = 0;
    for (const p of full.pr) {
      ap += (p.x - prev) * p.y;
      prev = p.x;
    }
    expect(ap).toBeCloseTo(averagePrecision(margin, labels), 12);
  });

  it('down-samples to a few hundred points, keeping both ends, and the area barely moves', () => {
    const distinct = new Set(margin).size;
    expect(distinct).toBeGreaterThan(50);
    const c = rocPrCurves(margin, probability, labels, 40);
    expect(c.roc).toHaveLength(Math.min(40, full.roc.length));
    expect(c.roc[0]).toEqual({ x: 0, y: 0, threshold: 1 });
    expect(c.roc[c.roc.length - 1]).toMatchObject({ x: 1, y: 1 });
    expect(Math.abs(trapezoidArea(c.roc) - trapezoidArea(full.roc))).toBeLessThan(0.01);
    // Thresholds fall as the curve moves towards (1, 1).
    for (let k = 1; k < c.roc.length; k++) expect(c.roc[k].threshold).toBeLessThanOrEqual(c.roc[k - 1].threshold);
    expect(downSample(full.roc, 10_000)).toBe(full.roc);
  });
});
