/**
 * Additivity of the explanations and equality of the compiled scorer with
 * the plain one. Exactness checks: contributions are defined to sum to
 * F(x) - E[F] (Lundberg & Lee 2017 for additive models), and the compiled
 * tables are a re-ordering of the same sum.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import {
  compileModel,
  explainRow,
  featureImportance,
  parseModel,
  scoreBatch,
  scoreRow,
  serializeModel,
  stagedScores,
  stepFunctions,
  topContributions,
  trainModel,
  type Model,
} from '../../shared/src/model';
import { syntheticFraudSet } from '../../scripts/model/synthetic';
import { breastCancerSet, rowOf } from './helpers/data';
import { breastCancerData } from './helpers/python';

const models: { name: string; model: Model; columns: ReturnType<typeof syntheticFraudSet>['columns']; n: number }[] = [];

beforeAll(() => {
  const d = syntheticFraudSet(3000, 11);
  models.push({ name: 'fraud-like, categorical + missing', model: trainModel(d, { rounds: 150 }).model, columns: d.columns, n: 3000 });
  const bc = breastCancerSet(breastCancerData());
  models.push({ name: 'breast cancer, exact', model: trainModel(bc, { rounds: 60, exact: true }).model, columns: bc.columns, n: bc.labels.length });
}, 120_000);

describe('explanations', () => {
  it('contributions sum to F(x) - E[F] on every row', () => {
    for (const m of models) {
      for (let i = 0; i < m.n; i++) {
        const row = rowOf(m.columns, i);
        const e = explainRow(m.model, row);
        const F = scoreRow(m.model, row).margin;
        const sum = e.contributions.reduce((a, c) => a + c.contribution, 0);
        expect(Math.abs(e.margin - F)).toBeLessThan(1e-12);
        expect(Math.abs(sum - (F - e.expectedMargin))).toBeLessThan(1e-10);
      }
    }
  }, 60_000);

  it('topContributions gives explainRow\'s first k contributions, value, number and text alike', () => {
    // A consistency check between the hot-path reasons and the full explanation (same sums, same order).
    for (const m of models) {
      for (let i = 0; i < m.n; i += 7) {
        const row = rowOf(m.columns, i);
        const full = explainRow(m.model, row).contributions.slice(0, 6);
        const top = topContributions(m.model, row, 6);
        expect(top).toEqual(full.map((c) => ({ feature: c.feature, featureIndex: c.featureIndex, value: c.value, contribution: c.contribution, text: c.text })));
      }
    }
  });

  it('E[F] is the mean margin over the training rows', () => {
    for (const m of models) {
      const s = scoreBatch(m.model, m.columns);
      const mean = s.margin.reduce((a, b) => a + b, 0) / m.n;
      expect(Math.abs(mean - m.model.baseline.expectedF)).toBeLessThan(1e-10);
    }
  });

  it('renders contributions in raw units', () => {
    const m = models[0];
    const e = explainRow(m.model, { ...rowOf(m.columns, 0), amount: 1240 });
    const amount = e.contributions.find((c) => c.feature === 'amount');
    expect(amount?.text).toMatch(/^amount 1,240\.00 (>|<=|in \()/);
    expect(amount?.text).toMatch(/: [+-]\d+\.\d\d$/);
  });

  it('step functions reproduce g_f and importance is sum |alpha| per feature', () => {
    const m = models[0];
    const fns = stepFunctions(m.model);
    const imp = featureImportance(m.model);
    const total = m.model.stumps.reduce((a, s) => a + Math.abs(s.alpha), 0);
    expect(imp.reduce((a, x) => a + x.importance, 0)).toBeCloseTo(total, 12);
    const row = rowOf(m.columns, 5);
    const e = explainRow(m.model, row);
    for (const c of e.contributions) {
      const fn = fns.find((f) => f.feature === c.feature)!;
      let g: number;
      if (fn.kind === 'numeric') {
        const v = c.value as number | null;
        g = v === null ? fn.missing : fn.values[fn.cuts.filter((x) => x < v).length];
      } else {
        const lv = fn.levels.find((l) => l.label === c.value) ?? fn.levels.find((l) => l.label === (c.value === null ? '(missing)' : '(other)'))!;
        g = lv.value;
      }
      expect(Math.abs(g - c.g)).toBeLessThan(1e-12);
    }
  });
});

describe('compiled scorer', () => {
  it('equals the plain scorer to 1e-12, row by row and on column batches', () => {
    for (const m of models) {
      const c = compileModel(m.model);
      const plain = scoreBatch(m.model, m.columns);
      const batch = c.scoreColumns(m.columns);
      for (let i = 0; i < m.n; i++) {
        expect(Math.abs(batch[i] - plain.margin[i])).toBeLessThan(1e-12);
        expect(Math.abs(c.score(rowOf(m.columns, i)) - plain.margin[i])).toBeLessThan(1e-12);
      }
    }
  }, 60_000);

  it('handles missing, unseen categories and absent features like the plain scorer', () => {
    const m = models[0];
    const c = compileModel(m.model);
    const rows = [{}, { mcc: 'never-seen', amount: null }, { country: null, channel: 'ecom', hour: 3 }, { amount: '12.5' }];
    for (const r of rows) expect(Math.abs(c.score(r) - scoreRow(m.model, r).margin)).toBeLessThan(1e-12);
  });
});

describe('scores', () => {
  it('normalised margin in [-1, 1], staged scores end at the final score', () => {
    const m = models[0];
    const row = rowOf(m.columns, 3);
    const s = scoreRow(m.model, row);
    expect(Math.abs(s.normalizedMargin)).toBeLessThanOrEqual(1);
    const staged = stagedScores(m.model, row);
    expect(staged).toHaveLength(m.model.stumps.length);
    expect(staged.at(-1)!.margin).toBeCloseTo(s.margin, 12);
  });

  it('survives a JSON round trip with identical scores', () => {
    for (const m of models) {
      const back = parseModel(serializeModel(m.model));
      const a = scoreBatch(m.model, m.columns).margin;
      const b = scoreBatch(back, m.columns).margin;
      expect(Array.from(b)).toEqual(Array.from(a));
    }
  });
});
