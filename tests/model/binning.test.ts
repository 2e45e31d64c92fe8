/** Binning: quantile bins, the missing bin, categorical pooling, exact mode past 255 values. */
import { describe, expect, it } from 'vitest';
import { applyBinning, fitBinning, scoreBatch, scoreRow, trainModel } from '../../shared/src/model';
import { numericCode } from '../../shared/src/model/binning';

describe('binning', () => {
  const n = 10_000;
  const x = Float64Array.from({ length: n }, (_, i) => (i % 97 === 0 ? NaN : Math.sin(i * 12.9898) * 1000));
  it('quantile mode: at most 255 value bins plus a missing bin, Uint8 codes, x > c_k <=> b(x) > k', () => {
    const b = fitBinning({ x }, [{ name: 'x', kind: 'numeric' }]);
    const bins = b.features[0];
    if (bins.kind !== 'numeric') throw new Error('numeric expected');
    expect(bins.cuts.length).toBeLessThanOrEqual(254);
    expect(bins.cuts.length).toBeGreaterThan(200);
    const [codes] = applyBinning(b, { x });
    expect(codes).toBeInstanceOf(Uint8Array);
    for (let i = 0; i < n; i++) {
      if (Number.isNaN(x[i])) expect(codes[i]).toBe(bins.cuts.length + 1);
      else for (const k of [0, 50, 100, bins.cuts.length - 1]) expect(codes[i] > k).toBe(x[i] > bins.cuts[k]);
    }
    // Roughly equal-frequency bins (common practice): no value bin holds more than 3x its share.
    const counts = new Map<number, number>();
    codes.forEach((c) => counts.set(c, (counts.get(c) ?? 0) + 1));
    for (const [c, k] of counts) if (c <= bins.cuts.length) expect(k).toBeLessThan((3 * n) / (bins.cuts.length + 1));
  });

  it('exact mode: every distinct value its own bin, cuts at midpoints, Uint16 codes past 255 values', () => {
    const v = Float64Array.from({ length: 1000 }, (_, i) => i * 0.5);
    const b = fitBinning({ v }, [{ name: 'v', kind: 'numeric' }], { exact: true });
    const bins = b.features[0];
    if (bins.kind !== 'numeric') throw new Error('numeric expected');
    expect(bins.cuts).toHaveLength(999);
    expect(bins.cuts[0]).toBe(0.25);
    const [codes] = applyBinning(b, { v });
    expect(codes).toBeInstanceOf(Uint16Array);
    expect(Array.from(codes)).toEqual(Array.from({ length: 1000 }, (_, i) => i));
    expect(numericCode(bins.cuts, 0.3)).toBe(1);
  });

  it('exact mode trains on more than 255 distinct values and scores new data with the stored bins', () => {
    const m = 3000;
    const v = Float64Array.from({ length: m }, (_, i) => i);
    const labels = Int8Array.from({ length: m }, (_, i) => (i >= 2700 ? 1 : -1));
    const { model } = trainModel({ features: [{ name: 'v', kind: 'numeric' }], columns: { v }, labels }, { rounds: 1, exact: true });
    const s = model.stumps[0];
    expect(s.kind === 'numeric' && s.threshold).toBe(2699.5);
    expect(scoreRow(model, { v: 2699.6 }).margin).toBeGreaterThan(0);
    expect(scoreRow(model, { v: 2699.4 }).margin).toBeLessThan(0);
  });

  it('categorical: rare categories pool into "other", unseen ones score as "other", null is missing', () => {
    const cat = Array.from({ length: 200 }, (_, i) => (i < 100 ? 'A' : i < 190 ? 'B' : i < 193 ? `rare${i}` : i < 196 ? null : 'C'));
    const b = fitBinning({ cat }, [{ name: 'cat', kind: 'categorical' }], { minCategoryCount: 5 });
    const bins = b.features[0];
    if (bins.kind !== 'categorical') throw new Error('categorical expected');
    expect(bins.categories).toEqual(['A', 'B']);
    expect(bins.pooledCategories).toBe(4); // three rare ones and C (4 rows)
    const [codes] = applyBinning(b, { cat: ['A', 'B', 'rare190', 'never', null] });
    expect(Array.from(codes)).toEqual([0, 1, 2, 2, 3]);
    const labels = Int8Array.from(cat, (c) => (c === 'B' ? 1 : -1));
    const { model } = trainModel({ features: [{ name: 'cat', kind: 'categorical' }], columns: { cat }, labels }, { rounds: 1 });
    const a = scoreBatch(model, { cat: ['zzz-unseen'] }).margin[0];
    expect(a).toBe(scoreRow(model, { cat: 'rare191' }).margin);
  });
});
