/**
 * Property tests of validateTransaction and parseIngestBody over thousands of
 * generated payloads (helpers/transaction-arbitraries.ts and
 * helpers/malformed-arbitraries.ts).
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { z } from 'zod';
import {
  ROOT_PATH,
  parseIngestBody,
  transactionInputSchema,
  validateTransaction,
  type Issue,
} from '../../../shared/src/api/transactions';
import { malformedCaseArb } from '../helpers/malformed-arbitraries';
import { NOW, validCaseArb } from '../helpers/transaction-arbitraries';

/** Every field path the schema declares, found by walking it, plus the item itself. */
function declaredPaths(schema: z.ZodType, prefix = ''): string[] {
  const def = (schema as unknown as { _zod: { def: { type: string; innerType?: z.ZodType; shape?: Record<string, z.ZodType>; in?: z.ZodType } } })._zod.def;
  if (def.type === 'optional' || def.type === 'nullable') return declaredPaths(def.innerType as z.ZodType, prefix);
  if (def.type === 'pipe') return declaredPaths(def.in as z.ZodType, prefix);
  if (def.type !== 'object' || !def.shape) return [];
  return Object.entries(def.shape).flatMap(([key, child]) => {
    const path = prefix ? `${prefix}.${key}` : key;
    return [path, ...declaredPaths(child, path)];
  });
}
const KNOWN_PATHS = new Set([ROOT_PATH, ...declaredPaths(transactionInputSchema)]);

// Anything that could be a card number: 12 or more digits in a row.
const DIGIT_RUN = /[0-9]{12,}/;

function expectCleanIssues(issues: Issue[], pan: string | null): void {
  expect(issues.length).toBeGreaterThan(0);
  for (const i of issues) {
    expect(typeof i.path).toBe('string');
    expect(i.path.length).toBeGreaterThan(0);
    expect(KNOWN_PATHS.has(i.path), `unknown path ${i.path}`).toBe(true);
    expect(typeof i.message).toBe('string');
    expect(i.message.length).toBeGreaterThan(0);
    expect(i.message).not.toMatch(DIGIT_RUN);
    if (pan) expect(i.message).not.toContain(pan.slice(-8));
  }
}

/** amountMinor / 10^exponent written as a decimal with exactly `exponent` decimals, by string arithmetic. */
function minorToFixed(minor: number, exponent: number): string {
  const s = BigInt(minor).toString().padStart(exponent + 1, '0');
  return exponent === 0 ? s : `${s.slice(0, -exponent)}.${s.slice(-exponent)}`;
}

describe('declared paths', () => {
  it('are the payload fields of the contract', () => {
    // The payload of the ingest contract, field by field.
    expect([...KNOWN_PATHS].sort()).toEqual(
      [
        ROOT_PATH, 'id', 'occurredAt', 'amount', 'currency', 'card', 'card.number', 'card.cardholderId', 'card.expiry',
        'merchant', 'merchant.id', 'merchant.name', 'merchant.mcc', 'merchant.country', 'cardPresent', 'channel',
        'deviceId', 'ip', 'location', 'location.lat', 'location.lon',
      ].sort(),
    );
  });
});

describe('valid payloads', () => {
  it('are all accepted and normalised consistently', () => {
    fc.assert(
      fc.property(validCaseArb, ({ payload, expected }) => {
        const r = validateTransaction(payload, { now: NOW });
        if (!r.ok) throw new Error(`refused: ${JSON.stringify(r.issues)}`);
        const v = r.value;
        expect(BigInt(v.amountMinor)).toBe(expected.amountMinor);
        expect(v.currencyExponent).toBe(expected.exponent);
        // amountMinor / 10^exp round-trips the decimal that was sent.
        expect(minorToFixed(v.amountMinor, v.currencyExponent)).toBe(expected.amountFixed);
        expect(Number(v.amount)).toBe(Number(expected.amountText));
        expect(v.occurredAt.getTime()).toBe(expected.occurredAtMs);
        expect(v.occurredAtIso).toBe(payload.occurredAt);
        expect(v.card.pan).toBe(expected.pan);
        expect(v.channel).toBe(expected.channel);
        expect(v.merchant.name).toBe(expected.merchantName);
        // The PAN is kept only in card.pan, which JSON (and so every JSON logger) skips.
        expect(JSON.stringify(v)).not.toContain(expected.pan);
      }),
      { numRuns: 3000 },
    );
  }, 60_000);

  it('survive a JSON round trip and prototype-reaching keys without polluting Object.prototype', () => {
    fc.assert(
      fc.property(validCaseArb, fc.constantFrom('__proto__', 'constructor', 'prototype'), ({ payload }, key) => {
        const text = JSON.stringify(payload).replace(/^\{/, `{"${key}":{"polluted":true,"id":"other"},`);
        const body = JSON.parse(text) as Record<string, unknown>;
        const r = validateTransaction(body, { now: NOW });
        expect(r.ok).toBe(true);
        if (r.ok) expect(r.value.id).toBe(payload.id);
        expect(({} as Record<string, unknown>).polluted).toBeUndefined();
      }),
      { numRuns: 500 },
    );
  }, 60_000);
});

describe('malformed payloads', () => {
  it('never throw, always return issues on real fields, and never echo a card number', () => {
    fc.assert(
      fc.property(malformedCaseArb, (m) => {
        let r: ReturnType<typeof validateTransaction> | undefined;
        expect(() => {
          r = validateTransaction(m.input, { now: NOW });
        }).not.toThrow();
        if (!r || r.ok) throw new Error(`accepted: ${m.what}`);
        expectCleanIssues(r.issues, m.pan);
        const named = r.issues.some((i) => i.path === m.expectPath || i.path.startsWith(`${m.expectPath}.`));
        expect(named, `${m.what}: ${JSON.stringify(r.issues)}`).toBe(true);
        expect(({} as Record<string, unknown>).polluted).toBeUndefined();
      }),
      { numRuns: 3000 },
    );
  }, 60_000);
});

describe('parseIngestBody', () => {
  const item = fc.oneof(
    validCaseArb.map((c) => ({ input: c.payload as unknown, valid: true, pan: c.expected.pan as string | null })),
    malformedCaseArb.map((m) => ({ input: m.input, valid: false, pan: m.pan })),
  );

  it('answers every item of a batch on its own, in order', () => {
    fc.assert(
      fc.property(fc.array(item, { minLength: 1, maxLength: 25 }), (items) => {
        const out = parseIngestBody({ transactions: items.map((i) => i.input) }, { now: NOW });
        if ('error' in out) throw new Error(`whole body refused: ${JSON.stringify(out.error)}`);
        expect(out.items.map((i) => i.index)).toEqual(items.map((_, n) => n));
        out.items.forEach((res, n) => {
          expect(res.result.ok).toBe(items[n].valid);
          // The same verdict as validating the item alone.
          expect(res.result).toEqual(validateTransaction(items[n].input, { now: NOW }));
          if (res.result.ok) {
            expect(res.id).toBe(res.result.value.id);
          } else {
            expectCleanIssues(res.result.issues, items[n].pan);
            if (res.id !== null) expect(res.id).toBe((items[n].input as { id: unknown }).id);
          }
          if (res.id !== null && items[n].pan) expect(res.id).not.toContain(items[n].pan);
        });
      }),
      { numRuns: 150 },
    );
  }, 60_000);

  it('takes a single transaction as a batch of one', () => {
    fc.assert(
      fc.property(item, (i) => {
        const out = parseIngestBody(i.input, { now: NOW });
        if (typeof i.input !== 'object' || i.input === null || Array.isArray(i.input)) {
          expect('error' in out).toBe(true);
          return;
        }
        if ('error' in out) throw new Error(JSON.stringify(out.error));
        expect(out.items).toHaveLength(1);
        expect(out.items[0].result.ok).toBe(i.valid);
      }),
      { numRuns: 500 },
    );
  }, 60_000);

  it('refuses whole bodies that are not an object, or a batch that is empty, too large or not an array', () => {
    const bodies = fc.oneof(
      fc.constantFrom<unknown>(null, undefined, 5, 'x', true, [], [{}]),
      fc.constant({ transactions: [] }),
      fc.integer({ min: 1001, max: 1500 }).map((n) => ({ transactions: new Array(n).fill({}) })),
      fc.anything().filter((v) => !Array.isArray(v)).map((v) => ({ transactions: v })),
    );
    fc.assert(
      fc.property(bodies, (body) => {
        const out = parseIngestBody(body, { now: NOW });
        if (!('error' in out)) throw new Error('accepted a bad body');
        expect(out.error.length).toBeGreaterThan(0);
        for (const e of out.error) expect([ROOT_PATH, 'transactions']).toContain(e.path);
      }),
      { numRuns: 300 },
    );
  });
});
