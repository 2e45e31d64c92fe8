/**
 * One check per rule of the ingest contract, each with the source of the rule
 * beside it. The base payload is the contract's own example.
 */
import { describe, expect, it } from 'vitest';
import {
  MAX_BATCH_SIZE,
  nestCsvRecord,
  parseIngestBody,
  parseOffsetDateTime,
  validateBackfillTransaction,
  validateTransaction,
  type Issue,
  type ValidTransaction,
} from '../../../shared/src/api/transactions';
import { pythonReference } from '../helpers/ingest-reference';
import { examplePayload } from '../helpers/transaction-arbitraries';

const NOW = new Date('2026-12-01T00:00:00Z');
const PAN = '4000000000000002';

const base = examplePayload;
type Payload = ReturnType<typeof base> & Record<string, unknown>;

function withChange(change: (p: Payload) => void): Payload {
  const p = structuredClone(base()) as Payload;
  change(p);
  return p;
}

function accepted(p: unknown): ValidTransaction {
  const r = validateTransaction(p, { now: NOW });
  if (!r.ok) throw new Error(`refused: ${JSON.stringify(r.issues)}`);
  return r.value;
}

function issuesOf(p: unknown): Issue[] {
  const r = validateTransaction(p, { now: NOW });
  if (r.ok) throw new Error('accepted');
  return r.issues;
}

const paths = (p: unknown) => issuesOf(p).map((i) => i.path);

describe('the example payload', () => {
  it('is accepted and normalised', () => {
    const v = accepted(base());
    expect(v.amountMinor).toBe(4210);
    expect(v.currencyExponent).toBe(2);
    expect(v.occurredAt.toISOString()).toBe('2026-11-30T14:03:00.000Z');
    expect(v.occurredAtIso).toBe('2026-11-30T14:03:00Z');
    expect(v.card.pan).toBe(PAN);
    expect(v.channel).toBe('pos');
    expect(v.location).toEqual({ lat: 40.7, lon: -74 });
  });

  it('keeps the card number out of JSON and out of property listings', () => {
    const v = accepted(base());
    expect(JSON.stringify(v)).not.toContain(PAN);
    expect(Object.keys(v.card)).not.toContain('pan');
    expect(JSON.stringify({ ...v.card })).not.toContain(PAN);
  });
});

describe('id', () => {
  it('takes 1-64 characters of A-Z a-z 0-9 . _ : -', () => {
    expect(accepted(withChange((p) => (p.id = 'Up.stream_1:a-b'))).id).toBe('Up.stream_1:a-b');
    expect(accepted(withChange((p) => (p.id = 'x'.repeat(64)))).id).toHaveLength(64);
    for (const bad of ['', 'x'.repeat(65), 'a b', 'ü', 'a/b']) expect(paths(withChange((p) => (p.id = bad)))).toEqual(['id']);
    expect(paths(withChange((p) => (p.id = 7 as unknown as string)))).toEqual(['id']);
  });

  it('refuses an id holding the card number, without repeating it', () => {
    const issues = issuesOf(withChange((p) => (p.id = `t-${PAN}`)));
    expect(issues).toEqual([{ path: 'id', message: 'must not contain the card number' }]);
  });
});

describe('occurredAt (ISO 8601 / RFC 3339 date-time with offset)', () => {
  it('accepts Z and ±hh:mm offsets and fractions of a second', () => {
    expect(accepted(withChange((p) => (p.occurredAt = '2026-11-30T09:03:00-05:00'))).occurredAt.toISOString()).toBe('2026-11-30T14:03:00.000Z');
    expect(accepted(withChange((p) => (p.occurredAt = '2026-11-30T19:33:00.5+05:30'))).occurredAt.toISOString()).toBe('2026-11-30T14:03:00.500Z');
    expect(accepted(withChange((p) => (p.occurredAt = '2026-11-30T14:03:00.123456789Z'))).occurredAt.toISOString()).toBe('2026-11-30T14:03:00.123Z');
  });

  it('refuses a local time without offset, and says so', () => {
    const [issue] = issuesOf(withChange((p) => (p.occurredAt = '2026-11-30T14:03:00')));
    expect(issue.path).toBe('occurredAt');
    expect(issue.message).toMatch(/offset/);
  });

  it('refuses impossible dates: 30 February, 29 February outside leap years, month 13', () => {
    // Gregorian leap years (ISO 8601): 2024 and 2000 leap, 2026 and 1900 not.
    for (const bad of ['2026-02-30T10:00:00Z', '2026-02-29T10:00:00Z', '1900-02-29T10:00:00Z', '2026-13-01T00:00:00Z', '2026-04-31T00:00:00Z', '2026-11-30T24:00:00Z']) {
      expect(paths(withChange((p) => (p.occurredAt = bad))), bad).toEqual(['occurredAt']);
    }
    expect(parseOffsetDateTime('2024-02-29T10:00:00Z').ok).toBe(true);
    expect(parseOffsetDateTime('2000-02-29T10:00:00Z').ok).toBe(true);
  });

  it('refuses more than 24 h after now, accepts exactly 24 h', () => {
    expect(accepted(withChange((p) => (p.occurredAt = '2026-12-02T00:00:00Z'))).id).toBe('t-1');
    const issues = issuesOf(withChange((p) => (p.occurredAt = '2026-12-02T00:00:00.001Z')));
    expect(issues).toEqual([{ path: 'occurredAt', message: 'is more than 24 hours in the future' }]);
    // The bound follows the caller's clock, not the machine's.
    expect(validateTransaction(base(), { now: new Date('2026-11-29T14:02:59Z') }).ok).toBe(false);
  });

  it('needs a valid now', () => {
    expect(() => validateTransaction(base(), { now: new Date('nope') })).toThrow(TypeError);
    expect(() => validateTransaction(base(), undefined as unknown as { now: Date })).toThrow(TypeError);
  });

  it('agrees with Python datetime.fromisoformat on real instants and impossible dates', () => {
    // Texts of the contract's shape: a grid over the calendar's edges (century and
    // leap years, months 0-13, days 0-32), then random ones with out-of-range parts.
    const texts: string[] = [];
    let seed = 17;
    const rand = (n: number) => {
      seed = (seed * 1103515245 + 12345) % 2 ** 31;
      return seed % n;
    };
    const two = (n: number) => String(n).padStart(2, '0');
    for (const year of ['0001', '1600', '1700', '1900', '2000', '2023', '2024', '2026', '2100', '2400', '9999']) {
      for (let month = 0; month <= 13; month++) {
        for (const day of [0, 1, 28, 29, 30, 31, 32]) texts.push(`${year}-${two(month)}-${two(day)}T12:00:00+01:00`);
      }
    }
    for (let i = 0; i < 3000; i++) {
      const year = String(1 + rand(9999)).padStart(4, '0');
      const fraction = rand(3) === 0 ? '' : `.${String(rand(10 ** 9)).padStart(9, '0').slice(0, 1 + rand(9))}`;
      const offset = rand(4) === 0 ? 'Z' : `${rand(2) ? '+' : '-'}${two(rand(24))}:${two(rand(60))}`;
      texts.push(`${year}-${two(rand(14))}-${two(rand(33))}T${two(rand(25))}:${two(rand(61))}:${two(rand(61))}${fraction}${offset}`);
    }
    const python = pythonReference<number | null>('datetime', texts);
    let real = 0;
    texts.forEach((t, i) => {
      const ours = parseOffsetDateTime(t);
      expect({ t, ms: ours.ok ? ours.date.getTime() : null }).toEqual({ t, ms: python[i] });
      if (ours.ok) real++;
    });
    expect(real).toBeGreaterThan(500); // both verdicts are exercised
  });
});

describe('amount', () => {
  it('takes exact decimals and normalises to minor units (USD 2 decimals, ISO 4217)', () => {
    expect(accepted(withChange((p) => (p.amount = '42.1'))).amountMinor).toBe(4210);
    expect(accepted(withChange((p) => (p.amount = '1000'))).amountMinor).toBe(100000);
    expect(accepted(withChange((p) => (p.amount = '0.01'))).amountMinor).toBe(1);
    expect(accepted(withChange((p) => (p.amount = '999999999999.99'))).amountMinor).toBe(99999999999999);
  });

  it('JPY has no decimals and BHD/KWD three (ISO 4217 minor units)', () => {
    const jpy = issuesOf(withChange((p) => Object.assign(p, { amount: '1500.5', currency: 'JPY' })));
    expect(jpy).toEqual([{ path: 'amount', message: 'JPY allows no decimals (ISO 4217 minor units)' }]);
    expect(paths(withChange((p) => Object.assign(p, { amount: '1500.0', currency: 'JPY' })))).toEqual(['amount']);
    expect(accepted(withChange((p) => Object.assign(p, { amount: '1500', currency: 'JPY' }))).amountMinor).toBe(1500);
    const bhd = accepted(withChange((p) => Object.assign(p, { amount: '12.345', currency: 'BHD' })));
    expect([bhd.amountMinor, bhd.currencyExponent]).toEqual([12345, 3]);
    expect(accepted(withChange((p) => Object.assign(p, { amount: '0.125', currency: 'KWD' }))).amountMinor).toBe(125);
    expect(paths(withChange((p) => Object.assign(p, { amount: '12.3456', currency: 'BHD' })))).toEqual(['amount']);
    expect(paths(withChange((p) => (p.amount = '42.101')))).toEqual(['amount']);
  });

  it('refuses zero, signs, exponents, separators, leading zeros and more than 12 integer digits', () => {
    for (const bad of ['0', '0.00', '-1', '+1', '1e3', '1E3', '1,000', '1 000', '1_000', ' 1', '007', '.5', '5.', '', 'NaN', '0x10', '1000000000000']) {
      expect(paths(withChange((p) => (p.amount = bad))), bad).toEqual(['amount']);
    }
    expect(accepted(withChange((p) => (p.amount = '999999999999'))).amountMinor).toBe(99999999999900);
  });

  it('refuses minor units beyond 2^53 (CLF has 4 decimals, ISO 4217)', () => {
    expect(paths(withChange((p) => Object.assign(p, { amount: '999999999999.9999', currency: 'CLF' })))).toEqual(['amount']);
    expect(accepted(withChange((p) => Object.assign(p, { amount: '99999999999.9999', currency: 'CLF' }))).amountMinor).toBe(999999999999999);
  });

  it('accepts a JSON number that converts exactly, and refuses one that does not', () => {
    const v = accepted(JSON.parse(JSON.stringify(base()).replace('"42.10"', '42.1')));
    expect([v.amountMinor, v.amount]).toEqual([4210, '42.1']);
    // 0.1 + 0.2 is 0.30000000000000004 as a binary double (IEEE 754): 17 significant digits, more than a double carries exactly.
    expect(paths(withChange((p) => ((p as Record<string, unknown>).amount = 0.1 + 0.2)))).toEqual(['amount']);
    // 16 significant digits (CLF has 4 decimals, ISO 4217): fine as a string, refused as a number.
    expect(accepted(withChange((p) => Object.assign(p, { amount: '123456789012.3456', currency: 'CLF' }))).amountMinor).toBe(1234567890123456);
    expect(paths(withChange((p) => Object.assign(p, { amount: 123456789012.3456, currency: 'CLF' })))).toEqual(['amount']);
    for (const bad of [0, -5, 1e21, Number.NaN, Number.POSITIVE_INFINITY]) {
      expect(paths(withChange((p) => ((p as Record<string, unknown>).amount = bad))), String(bad)).toEqual(['amount']);
    }
  });
});

describe('currency (ISO 4217 alpha-3, active, upper case)', () => {
  it('refuses lower case, unknown, no-minor-unit and withdrawn codes, and names the successor', () => {
    for (const bad of ['usd', 'US', 'ABC', 'XAU', 'XXX', '840']) expect(paths(withChange((p) => (p.currency = bad))), bad).toEqual(['currency']);
    const [hrk] = issuesOf(withChange((p) => (p.currency = 'HRK')));
    expect(hrk.message).toContain('EUR'); // Croatia moved to the euro in 2023 (from memory)
  });
});

describe('card', () => {
  it('takes digits with spaces or dashes, 12-19 digits after stripping', () => {
    expect(accepted(withChange((p) => (p.card.number = '4000-0000-0000-0002'))).card.pan).toBe(PAN);
    expect(accepted(withChange((p) => (p.card.number = '400000000002'))).card.pan).toBe('400000000002'); // 12 digits, Luhn-valid
    expect(accepted(withChange((p) => (p.card.number = '4000000000000000006'))).card.pan).toHaveLength(19);
    for (const bad of ['40000000002', '40000000000000000008', '4000.0000.0000.0002', '4000/0000', '']) {
      expect(paths(withChange((p) => (p.card.number = bad))), bad).toEqual(['card.number']);
    }
  });

  it('refuses a wrong Luhn digit (ISO/IEC 7812-1 Annex B) without repeating the number', () => {
    const issues = issuesOf(withChange((p) => (p.card.number = '4000 0000 0000 0003')));
    expect(issues.map((i) => i.path)).toEqual(['card.number']);
    expect(issues[0].message).toMatch(/Luhn/);
    expect(issues[0].message.replace(/[^0-9]/g, '')).not.toContain('40000000');
  });

  it('refuses a card number sent as a JSON number (it would lose digits past 2^53)', () => {
    expect(paths(withChange((p) => ((p.card as Record<string, unknown>).number = 4000000000000002)))).toEqual(['card.number']);
  });

  it('checks cardholderId (1-64) and the optional MM/YY expiry', () => {
    for (const bad of ['', 'x'.repeat(65)]) expect(paths(withChange((p) => (p.card.cardholderId = bad)))).toEqual(['card.cardholderId']);
    expect(accepted(withChange((p) => Object.assign(p.card, { expiry: '09/29' }))).card.expiry).toBe('09/29');
    for (const bad of ['13/29', '00/29', '9/29', '09/2029']) expect(paths(withChange((p) => Object.assign(p.card, { expiry: bad })))).toEqual(['card.expiry']);
  });
});

describe('merchant', () => {
  it('mcc is exactly 4 digits, 0000 not a code (ISO 18245)', () => {
    for (const bad of ['541', '0000', '54111', 'abcd']) expect(paths(withChange((p) => (p.merchant.mcc = bad))), bad).toEqual(['merchant.mcc']);
    expect(accepted(withChange((p) => (p.merchant.mcc = '0001'))).merchant.mcc).toBe('0001');
  });

  it('country is an upper-case ISO 3166-1 alpha-2 code', () => {
    for (const bad of ['us', 'USA', 'XK', 'ZZ']) expect(paths(withChange((p) => (p.merchant.country = bad))), bad).toEqual(['merchant.country']);
    expect(accepted(withChange((p) => (p.merchant.country = 'BH'))).merchant.country).toBe('BH');
  });

  it('name is trimmed, 1-120 characters; id 1-64', () => {
    expect(accepted(withChange((p) => (p.merchant.name = '  Kettle & Pine Grocers \t'))).merchant.name).toBe('Kettle & Pine Grocers');
    expect(accepted(withChange((p) => (p.merchant.name = ` ${'n'.repeat(120)} `))).merchant.name).toHaveLength(120);
    for (const bad of ['   ', 'n'.repeat(121)]) expect(paths(withChange((p) => (p.merchant.name = bad)))).toEqual(['merchant.name']);
    for (const bad of ['', 'm'.repeat(65)]) expect(paths(withChange((p) => (p.merchant.id = bad)))).toEqual(['merchant.id']);
  });
});

describe('cardPresent and channel', () => {
  it('defaults channel to pos when card-present and ecommerce when not', () => {
    expect(accepted(withChange((p) => delete (p as Record<string, unknown>).channel)).channel).toBe('pos');
    expect(accepted(withChange((p) => Object.assign(p, { cardPresent: false, channel: null }))).channel).toBe('ecommerce');
  });

  it('refuses a channel outside the list, and a channel that contradicts cardPresent (common practice)', () => {
    expect(paths(withChange((p) => (p.channel = 'web')))).toEqual(['channel']);
    expect(paths(withChange((p) => (p.channel = 'ecommerce')))).toEqual(['channel']);
    expect(paths(withChange((p) => Object.assign(p, { cardPresent: false, channel: 'contactless' })))).toEqual(['channel']);
    expect(accepted(withChange((p) => Object.assign(p, { cardPresent: false, channel: 'moto' }))).channel).toBe('moto');
  });

  it('cardPresent must be a boolean', () => {
    for (const bad of ['true', 1, null]) expect(paths(withChange((p) => ((p as Record<string, unknown>).cardPresent = bad)))).toEqual(['cardPresent']);
  });
});

describe('optional deviceId, ip, location', () => {
  it('may be absent or null', () => {
    const v = accepted(withChange((p) => Object.assign(p, { deviceId: null, ip: null, location: null })));
    expect([v.deviceId, v.ip, v.location]).toEqual([null, null, null]);
    const w = accepted(withChange((p) => ['deviceId', 'ip', 'location'].forEach((k) => delete (p as Record<string, unknown>)[k])));
    expect([w.deviceId, w.ip, w.location]).toEqual([null, null, null]);
  });

  it('ip is IPv4 or IPv6, stored in RFC 5952 form', () => {
    expect(accepted(withChange((p) => (p.ip = '2001:DB8:0:0:1:0:0:1'))).ip).toBe('2001:db8::1:0:0:1');
    for (const bad of ['203.0.113.256', '203.0.113', 'example.test', '1::2::3']) expect(paths(withChange((p) => (p.ip = bad)))).toEqual(['ip']);
  });

  it('location needs lat in -90..90 and lon in -180..180', () => {
    expect(accepted(withChange((p) => (p.location = { lat: -90, lon: 180 }))).location).toEqual({ lat: -90, lon: 180 });
    expect(paths(withChange((p) => (p.location = { lat: 90.5, lon: 0 })))).toEqual(['location.lat']);
    expect(paths(withChange((p) => (p.location = { lat: 0, lon: -180.5 })))).toEqual(['location.lon']);
    expect(paths(withChange((p) => ((p as Record<string, unknown>).location = { lat: '40.7', lon: 0 })))).toEqual(['location.lat']);
  });

  it('deviceId is 1-128 characters and may not hold the card number', () => {
    expect(paths(withChange((p) => (p.deviceId = 'd'.repeat(129))))).toEqual(['deviceId']);
    expect(paths(withChange((p) => (p.deviceId = `dev-${PAN.slice(0, 8)}-${PAN.slice(8)}`)))).toEqual(['deviceId']);
  });
});

describe('reporting', () => {
  it('names every bad field at once', () => {
    const p = withChange((q) => Object.assign(q, { amount: '1.5', currency: 'JPY', channel: 'ecommerce', merchant: { ...q.merchant, mcc: 5411 }, card: 7 }));
    expect(paths(p).sort()).toEqual(['amount', 'card', 'channel', 'merchant.mcc']);
  });

  it('never repeats digits sent in the wrong field', () => {
    const p = withChange((q) => Object.assign(q, { currency: PAN, merchant: { ...q.merchant, country: PAN, mcc: PAN }, channel: PAN, ip: PAN, occurredAt: PAN }));
    for (const i of issuesOf(p)) expect(i.message).not.toMatch(/[0-9]{12}/);
  });
});

describe('parseIngestBody', () => {
  it('answers a batch item by item: one bad item does not sink the rest', () => {
    const out = parseIngestBody({ transactions: [base(), withChange((p) => (p.merchant.mcc = '541')), withChange((p) => (p.id = 'a b'))] }, { now: NOW });
    if ('error' in out) throw new Error('refused');
    expect(out.items.map((i) => [i.index, i.id, i.result.ok])).toEqual([
      [0, 't-1', true],
      [1, 't-1', false],
      [2, null, false],
    ]);
  });

  it(`takes up to ${MAX_BATCH_SIZE} items and refuses more, or none`, () => {
    const full = parseIngestBody({ transactions: new Array(MAX_BATCH_SIZE).fill(base()) }, { now: NOW });
    expect('items' in full && full.items.length).toBe(MAX_BATCH_SIZE);
    expect(parseIngestBody({ transactions: new Array(MAX_BATCH_SIZE + 1).fill(base()) }, { now: NOW })).toEqual({
      error: [{ path: 'transactions', message: `must hold at most ${MAX_BATCH_SIZE} transactions: split the batch` }],
    });
    expect(parseIngestBody({ transactions: [] }, { now: NOW })).toEqual({ error: [{ path: 'transactions', message: 'must hold at least one transaction' }] });
    expect('error' in parseIngestBody({ transactions: {} }, { now: NOW })).toBe(true);
    expect('error' in parseIngestBody([base()], { now: NOW })).toBe(true);
    expect('error' in parseIngestBody(null, { now: NOW })).toBe(true);
  });
});

describe('CSV back-fill', () => {
  const row = (extra: Record<string, string>) =>
    nestCsvRecord({
      id: 'bf-1',
      occurredAt: '2026-10-02T08:15:00+02:00',
      amount: '19.99',
      currency: 'EUR',
      'card.number': '4000 0000 0000 0002',
      'card.cardholderId': 'c-3',
      'merchant.id': 'm-4',
      'merchant.name': 'Fernhollow Cycles',
      'merchant.mcc': '5941',
      'merchant.country': 'IE',
      cardPresent: 'false',
      'location.lat': '53.35',
      'location.lon': '-6.26',
      deviceId: '',
      ...extra,
    });

  it('reads CSV spellings of booleans, numbers and labels', () => {
    const cases: Array<[string, string]> = [['1', 'fraud'], ['+1', 'fraud'], ['fraud', 'fraud'], ['0', 'legitimate'], ['-1', 'legitimate'], ['legit', 'legitimate']];
    for (const [label, want] of cases) {
      const r = validateBackfillTransaction(row({ label, labelReportedAt: '2026-10-20T00:00:00Z' }), { now: NOW });
      if (!r.ok) throw new Error(JSON.stringify(r.issues));
      expect(r.value.label, label).toBe(want);
      expect(r.value.cardPresent).toBe(false);
      expect(r.value.location).toEqual({ lat: 53.35, lon: -6.26 });
      expect(r.value.deviceId).toBeNull();
      expect(r.value.labelReportedAt?.toISOString()).toBe('2026-10-20T00:00:00.000Z');
    }
    const unlabelled = validateBackfillTransaction(row({}), { now: NOW });
    expect(unlabelled.ok && unlabelled.value.label).toBeNull();
  });

  it('refuses unknown labels, a report date without label, and a report before the transaction', () => {
    const pathsOf = (extra: Record<string, string>) => {
      const r = validateBackfillTransaction(row(extra), { now: NOW });
      return r.ok ? [] : r.issues.map((i) => i.path);
    };
    expect(pathsOf({ label: 'maybe' })).toEqual(['label']);
    expect(pathsOf({ label: '2' })).toEqual(['label']);
    expect(pathsOf({ labelReportedAt: '2026-10-20T00:00:00Z' })).toEqual(['labelReportedAt']);
    expect(pathsOf({ label: '1', labelReportedAt: '2026-10-01T00:00:00Z' })).toEqual(['labelReportedAt']);
    expect(pathsOf({ label: '1', labelReportedAt: '2026-12-05T00:00:00Z' })).toEqual(['labelReportedAt']);
    expect(pathsOf({ cardPresent: 'maybe' })).toEqual(['cardPresent']);
    expect(pathsOf({ 'location.lat': 'north' })).toEqual(['location.lat']);
  });

  it('nests dotted headers without touching prototypes', () => {
    const nested = nestCsvRecord({ 'a.b': '1', '__proto__.polluted': 'yes', 'constructor.prototype.polluted': 'yes', 'a.b.c': 'clash', x: ' ' });
    expect(JSON.parse(JSON.stringify(nested))).toEqual({ a: { b: '1' } });
    expect(({} as Record<string, unknown>).polluted).toBeUndefined();
  });
});
