/**
 * Drift: the population stability index of live values against a version's
 * stored training baseline. PSI = sum_i (a_i - e_i) ln(a_i / e_i), a_i and e_i
 * the actual and expected shares of bin i (Yurdakul 2018, "Statistical
 * properties of population stability index"; the usual formula in credit
 * scoring). Examples below are small invented fixtures worked by hand.
 */
import { describe, expect, it } from 'vitest';
import { psi, psiBand, type Model } from '../../../shared/src/model';
import { buildDriftBaseline, psiNumeric, psiOfCategories } from '../../../server/src/drift/baseline';

const repeat = (v: number, k: number) => Array.from({ length: k }, () => v);

describe('PSI against a stored baseline', () => {
  it('three numeric bins, worked by hand', () => {
    // Baseline: edges 10 and 20; 50 training rows <= 10, 30 in (10, 20], 20 above 20, none missing.
    const baseline = { edges: [10, 20], counts: [50, 30, 20, 0] };
    // Live: 40 rows <= 10 (one exactly on the edge 10 counts in the lower bin), 30 in (10, 20], 30 above 20.
    const live = [...repeat(3, 39), 10, ...repeat(15, 30), ...repeat(99, 30)];
    // e = (0.5, 0.3, 0.2), a = (0.4, 0.3, 0.3):
    //   (0.4 - 0.5) ln(0.4 / 0.5) = (-0.1)(-0.223144) = 0.0223144
    //   (0.3 - 0.3) ln(0.3 / 0.3) = 0
    //   (0.3 - 0.2) ln(0.3 / 0.2) = (0.1)(0.405465)  = 0.0405465
    //   PSI = 0.0628609
    const r = psiNumeric(baseline, live);
    expect(r.expectedShare.slice(0, 3)).toEqual([0.5, 0.3, 0.2]);
    expect(r.actualShare.slice(0, 3)).toEqual([0.4, 0.3, 0.3]);
    expect(r.psi).toBeCloseTo(0.0628609, 6);
    expect(r.band).toBe('stable');
  });

  it('two bins past the flag limit, worked by hand', () => {
    // Baseline: edge 0.5; 90 rows <= 0.5, 10 above. Live: 60 <= 0.5, 40 above.
    // (0.6 - 0.9) ln(0.6 / 0.9) = (-0.3)(-0.405465) = 0.121640
    // (0.4 - 0.1) ln(0.4 / 0.1) = (0.3)(1.386294)   = 0.415888
    // PSI = 0.537528 > 0.25: "act" (rule of thumb, common practice).
    const r = psiNumeric({ edges: [0.5], counts: [90, 10, 0] }, [...repeat(0.2, 60), ...repeat(0.9, 40)]);
    expect(r.psi).toBeCloseTo(0.537528, 6);
    expect(psiBand(r.psi)).toBe('act');
  });

  it('categories, with an unseen one counted with the pooled rest', () => {
    // Baseline: pos 60, ecommerce 30, pooled other 10. Live: pos 50, ecommerce 30, "moto" (unseen) 20.
    // (0.5 - 0.6) ln(0.5 / 0.6) = (-0.1)(-0.182322) = 0.0182322
    // (0.3 - 0.3) ln(1)                             = 0
    // (0.2 - 0.1) ln(0.2 / 0.1) = (0.1)(0.693147)   = 0.0693147
    // PSI = 0.0875469
    const b = { feature: 'channel', kind: 'categorical' as const, categories: ['pos', 'ecommerce'], counts: [60, 30], other: 10, missing: 0 };
    const live = [...Array(50).fill('pos'), ...Array(30).fill('ecommerce'), ...Array(20).fill('moto')];
    expect(psiOfCategories(b, live).psi).toBeCloseTo(0.0875469, 6);
  });

  it('a baseline built from training rows reproduces psi() on the raw rows, and is 0 against itself', () => {
    let s = 99;
    const rand = () => ((s = (s * 16807) % 2147483647) / 2147483647);
    const n = 5000;
    const amount = Float64Array.from({ length: n }, () => (rand() < 0.03 ? NaN : Math.round(rand() * 300)));
    const channel = Array.from({ length: n }, () => (rand() < 0.02 ? null : ['pos', 'ecommerce', 'atm'][Math.floor(rand() * 3)]));
    const probability = Float64Array.from({ length: n }, () => rand());
    const model = { features: [{ name: 'amount', kind: 'numeric' }, { name: 'channel', kind: 'categorical' }] } as unknown as Model;
    const baseline = buildDriftBaseline(model, { amount, channel }, probability);
    expect(baseline.n).toBe(n);
    const [num, cat] = baseline.features;
    if (num.kind !== 'numeric' || cat.kind !== 'categorical') throw new Error('unexpected baseline kinds');
    expect(num.counts.reduce((a, b) => a + b, 0)).toBe(n);
    expect(num.counts[num.counts.length - 1]).toBe(amount.filter((v) => Number.isNaN(v)).length);
    expect(psiNumeric(num, amount).psi).toBe(0);
    expect(psiOfCategories(cat, channel).psi).toBe(0);

    const live = Float64Array.from({ length: 3000 }, () => Math.round(rand() * 400));
    expect(psiNumeric(num, live).psi).toBeCloseTo(psi(amount, live, num.edges).psi, 12);
    const liveScores = Float64Array.from({ length: 3000 }, () => rand() ** 2);
    expect(psiNumeric(baseline.score, liveScores).psi).toBeCloseTo(psi(probability, liveScores, 10).psi, 12);
  });
});
