import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { parse } from 'csv-parse/sync';
import { PassThrough } from 'node:stream';
import { neutraliseCell, writeCsv } from '../../server/src/audit/csv-export';
import { atOrAbove, GRID, histogramAtOrAbove, precisionRecallFromHistogram } from '../../server/src/settings/threshold-curve';
import { median } from '../../server/src/board/board-queries';
import { firstMatchingRule, ruleMatches, routingRuleInputSchema, thresholdForCapacity, type ThresholdPoint } from '../../shared/src/api/supervision';
import { histogramByClass } from '../../shared/src/model/index';

describe('CSV cells against formula injection', () => {
  // OWASP "CSV Injection": cells starting with = + - @ tab (0x09) or CR (0x0D) get a leading single quote;
  // so do those with a trigger behind leading spaces or quotes, which spreadsheets look past (common practice).
  it.each(['=1+1', '+1', '-1', '@A1', '\t=1', '\r=1', '\0x', ' =1', '  @A1', '"=1', "'+1"])('neutralises %j', (cell) => {
    expect(neutraliseCell(cell)).toBe(`'${cell}`);
  });

  it.each(['plain', '1+1', ' 1-1', "'already quoted", ''])('leaves %j as it is', (cell) => {
    expect(neutraliseCell(cell)).toBe(cell);
  });

  it('writes quoted RFC 4180 CSV that reads back to the neutralised cells', async () => {
    await fc.assert(
      fc.asyncProperty(fc.array(fc.array(fc.string({ maxLength: 12 }), { minLength: 2, maxLength: 2 }), { maxLength: 20 }), async (rows) => {
        const out = new PassThrough();
        const chunks: Buffer[] = [];
        out.on('data', (c: Buffer) => chunks.push(c));
        async function* gen() {
          for (const r of rows) yield r;
        }
        const n = await writeCsv(out, ['a', 'b'], gen());
        expect(n).toBe(rows.length);
        const back = parse(Buffer.concat(chunks).toString('utf8'), { relax_column_count: false }) as string[][];
        expect(back).toEqual([['a', 'b'], ...rows.map((r) => r.map(neutraliseCell))]);
        for (const r of back.slice(1)) for (const cell of r) expect(/^[=+\-@\t\r\0]/.test(cell)).toBe(false);
      }),
      { numRuns: 60 },
    );
  });
});

describe('threshold curve arithmetic', () => {
  it('counts rows at or above each grid threshold from 0.01-wide buckets', () => {
    const counts = atOrAbove(new Map([[0, 100], [5, 3], [50, 2], [99, 1]]));
    expect(counts[GRID.indexOf(0.01)]).toBe(6);
    expect(counts[GRID.indexOf(0.05)]).toBe(6);
    expect(counts[GRID.indexOf(0.06)]).toBe(3);
    expect(counts[GRID.indexOf(0.5)]).toBe(3);
    expect(counts[GRID.indexOf(0.51)]).toBe(1);
    expect(counts[GRID.indexOf(0.99)]).toBe(1);
  });

  it('agrees exactly at bin edges with counting the raw scores of the histogram (shared histogramByClass)', () => {
    fc.assert(
      fc.property(fc.array(fc.tuple(fc.double({ min: 0, max: 1, noNaN: true }), fc.boolean()), { minLength: 5, maxLength: 200 }), (rows) => {
        const p = rows.map((r) => r[0]);
        const y = rows.map((r) => (r[1] ? 1 : -1));
        const h = histogramByClass(p, y, { bins: 20, min: 0, max: 1 });
        for (let k = 1; k < 20; k += 1) {
          const t = h.edges[k];
          const tp = rows.filter((r) => r[1] && r[0] >= t).length;
          const fp = rows.filter((r) => !r[1] && r[0] >= t).length;
          expect(histogramAtOrAbove(h.edges, h.fraud, t)).toBeCloseTo(tp, 9);
          expect(histogramAtOrAbove(h.edges, h.legitimate, t)).toBeCloseTo(fp, 9);
        }
      }),
      { numRuns: 100 },
    );
  });

  it('gives precision = TP/(TP+FP) and recall = TP/all fraud, null where there is nothing to divide by', () => {
    const edges = Array.from({ length: 21 }, (_, k) => k / 20);
    const fraud = new Array(20).fill(0);
    const legitimate = new Array(20).fill(0);
    fraud[19] = 4;
    legitimate[0] = 96;
    const pr = precisionRecallFromHistogram({ edges, fraud, legitimate });
    expect(pr[GRID.indexOf(0.5)]).toEqual({ precision: 1, recall: 1 });
    // At 0.01, 0.8 of the lowest bin [0, 0.05) still counts as at or above.
    expect(pr[GRID.indexOf(0.01)].precision).toBeCloseTo(4 / (4 + 96 * 0.8), 12);
  });

  it('picks the lowest threshold whose expected cases fit the capacity', () => {
    const points: ThresholdPoint[] = [0.3, 0.1, 0.2].map((t) => ({ threshold: t, alertsPerDay: 100 / t, casesPerDay: 10 / t, precision: null, recall: null }));
    expect(thresholdForCapacity(points, 60)?.threshold).toBe(0.2);
    expect(thresholdForCapacity(points, 100)?.threshold).toBe(0.1);
    expect(thresholdForCapacity(points, 10)).toBeNull();
  });
});

describe('routing rule matching', () => {
  const facts = { amountAtRiskMinor: 250_000, currencyExponent: 2, mcc: '5411', merchantCountry: 'FR', channel: 'ecommerce' };
  const rule = (over: object) => routingRuleInputSchema.parse({ name: 'rule', groupId: 1, ...over });

  it('holds when every given condition holds; the amount is strictly above the limit in major units', () => {
    expect(ruleMatches(rule({ minAmount: 2499.99 }), facts)).toBe(true);
    expect(ruleMatches(rule({ minAmount: 2500 }), facts)).toBe(false);
    expect(ruleMatches(rule({ mccs: ['5411', '5999'], countries: ['FR'] }), facts)).toBe(true);
    expect(ruleMatches(rule({ mccs: ['5411'], countries: ['DE'] }), facts)).toBe(false);
    expect(ruleMatches(rule({ channels: ['pos'] }), facts)).toBe(false);
    // JPY has no minor unit (ISO 4217 exponent 0).
    expect(ruleMatches(rule({ minAmount: 200_000 }), { ...facts, amountAtRiskMinor: 250_000, currencyExponent: 0 })).toBe(true);
  });

  it('takes the first enabled match in order', () => {
    const rules = [rule({ countries: ['FR'], enabled: false }), rule({ minAmount: 5000 }), rule({ mccs: ['5411'] }), rule({ countries: ['FR'] })];
    expect(firstMatchingRule(rules, facts)).toBe(2);
    expect(firstMatchingRule([], facts)).toBe(-1);
  });

  it('refuses a rule without any condition', () => {
    expect(routingRuleInputSchema.safeParse({ name: 'all', groupId: 1 }).success).toBe(false);
  });
});

describe('median handling time', () => {
  it('is the middle value, or the mean of the two middle values', () => {
    expect(median([])).toBeNull();
    expect(median([30, 10])).toBe(20);
    expect(median([5, 1, 3])).toBe(3);
  });
});
