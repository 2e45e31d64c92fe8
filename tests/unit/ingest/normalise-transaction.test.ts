import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { nestCsvRecord, validateBackfillTransaction, validateTransaction, type ValidTransaction } from '../../../shared/src/api/transactions';
import { normaliseTransaction } from '../../../server/src/ingest/normalise-transaction';
import { panHash } from '../../../server/src/ingest/pan-token';
import { NOW, examplePayload, validCaseArb } from '../helpers/transaction-arbitraries';

const KEY = 'test-pan-hmac-key-0123456789';
const PAN = '4000000000000002';
const example = { ...examplePayload(), card: { ...examplePayload().card, expiry: '09/29' } };

function valid(input: unknown): ValidTransaction {
  const r = validateTransaction(input, { now: NOW });
  if (!r.ok) throw new Error(JSON.stringify(r.issues));
  return r.value;
}

/** Every key anywhere in a JSON value. */
function keysOf(v: unknown): string[] {
  if (Array.isArray(v)) return v.flatMap(keysOf);
  if (typeof v === 'object' && v !== null) return Object.entries(v).flatMap(([k, x]) => [k, ...keysOf(x)]);
  return [];
}

describe('normaliseTransaction', () => {
  it('stores the example with BIN, last four and keyed hash, and no 12+ digit run anywhere', () => {
    const n = normaliseTransaction(valid(example), KEY);
    const json = JSON.stringify(n);
    expect(json).not.toMatch(/[0-9]{12,}/);
    expect(n.card).toEqual({ bin: '400000', last4: '0002', panHash: panHash(PAN, KEY), cardholderId: 'c-17', expiry: '09/29' });
    expect(n).toMatchObject({ externalId: 't-1', amountMinor: 4210, amount: 42.1, currency: 'USD', currencyExponent: 2, channel: 'pos', lat: 40.7, lon: -74 });
    expect(n.occurredAt.toISOString()).toBe('2026-11-30T14:03:00.000Z');
    expect(keysOf(JSON.parse(json))).not.toContain('pan');
    expect(keysOf(JSON.parse(json))).not.toContain('number');
  });

  it('masks another card number written into the merchant name to BIN and last four (PCI DSS display rule, common practice)', () => {
    // 5555 5555 5555 4444: a Mastercard test number published for sandboxes (from memory), Luhn-valid.
    const n = normaliseTransaction(valid({ ...example, merchant: { ...example.merchant, name: 'Refund to 5555 5555 5555 4444' } }), KEY);
    expect(n.merchant.name).toBe('Refund to 5555 55•• •••• 4444');
    expect(normaliseTransaction(valid(example), KEY).merchant.name).toBe(example.merchant.name);
  });

  it('gives the same hash for the same number however it is spaced, and another under another key', () => {
    const spellings = ['4000 0000 0000 0002', '4000-0000-0000-0002', '4000000000000002', ' 4000 0000-0000 0002 '];
    const hashes = spellings.map((number) => normaliseTransaction(valid({ ...example, card: { ...example.card, number } }), KEY).card.panHash);
    expect(new Set(hashes).size).toBe(1);
    expect(normaliseTransaction(valid(example), `${KEY}-other`).card.panHash).not.toBe(hashes[0]);
  });

  it('never carries the card number, for any valid payload', () => {
    fc.assert(
      fc.property(validCaseArb, ({ payload, expected }) => {
        const n = normaliseTransaction(valid(payload), KEY);
        const json = JSON.stringify(n);
        // No 12-digit window of the number survives anywhere (BIN and last four are 10 digits at most).
        for (let i = 0; i + 12 <= expected.pan.length; i++) expect(json).not.toContain(expected.pan.slice(i, i + 12));
        expect(n.card.bin).toBe(expected.pan.slice(0, 6));
        expect(n.card.last4).toBe(expected.pan.slice(-4));
        expect(n.card.panHash).toMatch(/^[0-9a-f]{64}$/);
        expect(Object.keys(n.card).sort()).toEqual(['bin', 'cardholderId', 'expiry', 'last4', 'panHash']);
        // amount is amountMinor in major units; both divisions are correctly rounded (IEEE 754), so they agree exactly.
        expect(n.amount).toBe(Number(expected.amountText));
        expect(BigInt(n.amountMinor)).toBe(expected.amountMinor);
      }),
      { numRuns: 1000 },
    );
  }, 60_000);

  it('carries the back-fill label and when it was reported', () => {
    const r = validateBackfillTransaction(
      nestCsvRecord({
        id: 'bf-1', occurredAt: '2026-10-02T08:15:00Z', amount: '12.345', currency: 'KWD', 'card.number': PAN, 'card.cardholderId': 'c-3',
        'merchant.id': 'm-4', 'merchant.name': 'Fernhollow Cycles', 'merchant.mcc': '5941', 'merchant.country': 'KW', cardPresent: '1',
        label: 'fraud', labelReportedAt: '2026-10-30T00:00:00Z',
      }),
      { now: NOW },
    );
    if (!r.ok) throw new Error(JSON.stringify(r.issues));
    const n = normaliseTransaction(r.value, KEY);
    expect([n.label, n.labelReportedAt?.toISOString(), n.amountMinor, n.currencyExponent]).toEqual(['fraud', '2026-10-30T00:00:00.000Z', 12345, 3]);
    expect('label' in normaliseTransaction(valid(example), KEY)).toBe(false);
  });
});
