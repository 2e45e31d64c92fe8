/**
 * The incremental-histogram trainer must choose exactly the stumps a plain
 * full-rebuild implementation chooses (tests/model/helpers/plain-boost.ts),
 * up to float rounding. Data: a few thousand seeded fraud-like rows with
 * categorical features and missing values (a consistency check between two
 * implementations, no check value comes from the data).
 */
import { describe, expect, it } from 'vitest';
import { trainModel } from '../../shared/src/model';
import { syntheticFraudSet } from '../../scripts/model/synthetic';
import { plainBoost } from './helpers/plain-boost';

describe('incremental histograms vs plain full rebuild', () => {
  const d = syntheticFraudSet(4000, 7);
  const input = { features: d.features, columns: d.columns, labels: d.labels };
  const cases = [
    { name: 'uniform start, full step', opts: { rounds: 120 } },
    { name: 'class weights and shrinkage, no rebuild for 1000 rounds', opts: { rounds: 120, shrinkage: 0.3, classWeights: { positive: 20, negative: 1 }, rebuildEvery: 1000 } },
    { name: 'rebuild every round', opts: { rounds: 60, histogramUpdate: 'rebuild' as const } },
    { name: 'no feature bundling', opts: { rounds: 60, bundleFeatures: false } },
  ];
  for (const c of cases) {
    it(`same stumps: ${c.name}`, () => {
      const fast = trainModel(input, c.opts);
      const plain = plainBoost(input, c.opts);
      expect(fast.trace.length).toBe(plain.length);
      fast.trace.forEach((r, t) => {
        const p = plain[t];
        const s = fast.model.stumps[t];
        const k = s.kind === 'numeric' ? s.cut : s.code;
        expect({ t, f: r.featureIndex, k, polarity: r.polarity, mr: s.kind === 'numeric' ? s.missingRight : false }).toEqual({
          t,
          f: p.f,
          k: p.k,
          polarity: p.polarity,
          mr: p.missingRight,
        });
        expect(Math.abs(r.alpha - p.alpha)).toBeLessThan(1e-9);
      });
    }, 60_000);
  }

  it('uses categorical stumps and missing-value routing on this data', () => {
    const fast = trainModel(input, { rounds: 120 });
    expect(fast.model.stumps.some((s) => s.kind === 'categorical')).toBe(true);
    expect(fast.model.stumps.some((s) => s.kind === 'numeric' && s.missingRight)).toBe(true);
  }, 60_000);
});
