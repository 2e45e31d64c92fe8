/**
 * Malformed ingest payloads: a valid payload with one field broken (deleted,
 * the wrong type, a junk or huge string, a number where a string belongs or
 * the other way round, nested garbage), or no object at all; optionally with
 * prototype-pollution keys added. Each case names the field path an issue must
 * point at. Every broken value is one the contract refuses by its own rules.
 */
import fc from 'fast-check';
import { luhnCheckDigit } from '../../../shared/src/card/luhn';
import { validCaseArb, type ValidCase } from './transaction-arbitraries';

export interface MalformedCase {
  input: unknown;
  /** An issue's path must equal this or lie under it. */
  expectPath: string;
  /** The card number digits the payload carried (for the no-echo checks), if any. */
  pan: string | null;
  what: string;
}

const huge = (unit: string) => fc.constantFrom(1_000, 70_000, 200_000).map((n) => unit.repeat(Math.ceil(n / unit.length)));
const wrongTypes = (...extra: unknown[]) => fc.constantFrom<unknown>(42, -1, 0, true, false, [], [1, 2], {}, { a: 1 }, ...extra);
const nested: fc.Arbitrary<unknown> = fc.letrec((tie) => ({
  node: fc.oneof({ depthSize: 'small' }, fc.anything(), fc.array(tie('node'), { maxLength: 3 }), fc.dictionary(fc.string(), tie('node'), { maxKeys: 3 })),
})).node;
/** Anything but a string (nor null/undefined, which optional fields take as "not given"). */
const notString = fc.oneof(wrongTypes(), nested).filter((v) => typeof v !== 'string' && v !== null && v !== undefined);
/** Anything but a JSON object (for object-valued fields). */
const notObject = fc.oneof(wrongTypes('a string'), nested).filter((v) => v !== null && v !== undefined && (typeof v !== 'object' || Array.isArray(v)));

type FieldRule = { required: boolean; bad: (c: ValidCase) => fc.Arbitrary<unknown> };

/** Fields where a value holding the card number is refused because it holds it (any other digits are fine there). */
const PAN_GUARDED = new Set(['id', 'card.cardholderId', 'merchant.id', 'merchant.name', 'deviceId']);

/**
 * Card numbers in the wrong field: the case's own number (plain, grouped, or
 * as a JSON number) and other long digit runs. Every field but card.number
 * refuses them, and no message may repeat them.
 */
function panElsewhere(c: ValidCase, path: string): fc.Arbitrary<unknown> | null {
  if (path === 'card.number') return null;
  const pan = c.expected.pan;
  const own = [pan, pan.replace(/(\d{4})(?=\d)/g, '$1 '), Number(pan)];
  const longDigits = fc.string({ unit: fc.constantFrom(...'0123456789'), minLength: 13, maxLength: 40 });
  if (PAN_GUARDED.has(path)) return fc.constantFrom<unknown>(...own);
  // A 12-digit number is a valid amount (12 integer digits), so only longer runs are wrong there. The
  // number form drops a leading zero: 0438657839355 becomes the valid amount 438657839355.
  if (path === 'amount') {
    const tooLong = own.filter((v) => typeof v === 'string' || String(v).length > 12);
    return pan.length > 12 ? fc.oneof(fc.constantFrom<unknown>(...tooLong), longDigits) : longDigits;
  }
  return fc.oneof(fc.constantFrom<unknown>(...own), longDigits);
}

/** A card number off by one in its check digit. */
const wrongLuhn = (pan: string) => pan.slice(0, -1) + String((Number(luhnCheckDigit(pan.slice(0, -1))) + 1) % 10);

const FIELDS: Record<string, FieldRule> = {
  id: { required: true, bad: () => fc.oneof(notString, fc.constantFrom('', 'a b', 'x'.repeat(65), 'café', 't-1\n', 'id/1'), huge('abc')) },
  occurredAt: {
    required: true,
    bad: () =>
      fc.oneof(
        notString,
        fc.constantFrom(
          '2026-02-30T10:00:00Z', // no 30 February
          '2026-02-29T10:00:00Z', // 2026 is not a leap year
          '2026-11-30T14:03:00', // no offset
          '2026-11-30T14:03', // no seconds, no offset
          '2026-11-30',
          '2026-11-30 14:03:00Z',
          '2026-11-30T24:00:00Z',
          '2026-11-30T14:60:00Z',
          '2026-11-30T14:03:00+24:00',
          '2026-11-30T14:03:00+0100',
          '2026-13-01T00:00:00Z',
          '2027-06-01T00:00:00Z', // beyond NOW + 24 h
          '1764547380', // epoch seconds as a string
          'yesterday',
          '',
        ),
        fc.constantFrom(1764547380000, 1764547380), // epoch numbers
        huge('2026-11-30T14:03:00Z'),
      ),
  },
  amount: {
    required: true,
    bad: () =>
      fc.oneof(
        fc.constantFrom<unknown>(true, false, [], {}, { value: '1' }, ''),
        fc.constantFrom('-1', '+1', '-0.5', '1e3', '1E3', '1,000', '1 000', "1'000", '1_000', ' 1', '1 ', '0', '0.00', '00.5', '007', '.5', '5.', 'NaN', 'Infinity', '0x10', '1.2.3', '42.12345', '4'.repeat(13), '١٢'),
        fc.constantFrom(-5, 0, -0, 1e21, 1e-7, 0.1 + 0.2, Number.NaN, Number.POSITIVE_INFINITY, 1234567890123),
        huge('1'),
      ),
  },
  currency: {
    required: true,
    bad: () => fc.oneof(notString, fc.constantFrom('usd', 'Usd', 'US', 'USDD', 'XXX', 'XAU', 'XTS', 'HRK', 'BGN', '840', '', 'ABC', ' USD')),
  },
  card: { required: true, bad: (c) => fc.oneof(notObject, fc.constant(c.expected.pan)) },
  'card.number': {
    required: true,
    bad: (c) =>
      fc.oneof(
        notString,
        fc.constant(Number(c.expected.pan)), // the number sent as a JSON number
        fc.constant(wrongLuhn(c.expected.pan)),
        fc.constantFrom('4000 0000 002', `${'4'.repeat(19)}8`, '4000.0000.0000.0002', '4000_0000_0000_0002', 'abcd', '', ' '),
        huge('4'),
      ),
  },
  'card.cardholderId': { required: true, bad: (c) => fc.oneof(notString, fc.constantFrom('', 'x'.repeat(65), 'a\u0000b'), fc.constant(`ch-${c.expected.pan}`), huge('c')) },
  'card.expiry': { required: false, bad: () => fc.oneof(notString, fc.constantFrom('13/25', '00/25', '1/25', '2025-12', '12/2025', '')) },
  merchant: { required: true, bad: () => notObject },
  'merchant.id': { required: true, bad: () => fc.oneof(notString, fc.constantFrom('', 'm'.repeat(65), 'm\u007f'), huge('m')) },
  'merchant.name': { required: true, bad: (c) => fc.oneof(notString, fc.constantFrom('', '   ', 'n'.repeat(121), 'Shop\u0007'), fc.constant(`Shop ${c.expected.pan}`), huge('n')) },
  'merchant.mcc': { required: true, bad: () => fc.oneof(notString, fc.constantFrom<unknown>(5411, '541', '0000', '54111', 'abcd', '', ' 5411', '5411.0')) },
  'merchant.country': { required: true, bad: () => fc.oneof(notString, fc.constantFrom<unknown>(840, 'us', 'USA', 'XK', 'ZZ', 'AA', '', 'U')) },
  cardPresent: { required: true, bad: () => fc.constantFrom<unknown>('true', 'false', 1, 0, 'yes', [], {}, null) },
  channel: { required: false, bad: () => fc.oneof(notString, fc.constantFrom('web', 'POS', 'Pos', '', 'card')) },
  deviceId: { required: false, bad: (c) => fc.oneof(notString, fc.constantFrom('', 'd'.repeat(129)), fc.constant(`dev-${c.expected.pan}`), huge('d')) },
  ip: { required: false, bad: () => fc.oneof(notString, fc.constantFrom('01.2.3.4', '256.0.0.1', '1.2.3', 'fe80::1%eth0', '1::2::3', 'localhost', '', '203.0.113.7/24')) },
  location: { required: false, bad: () => fc.oneof(notObject, fc.constantFrom<unknown>({ lat: 0 }, { lon: 0 }, {})) },
  'location.lat': { required: true, bad: () => fc.constantFrom<unknown>(90.0001, -91, '40.7', null, Number.NaN, Number.POSITIVE_INFINITY, [], {}) },
  'location.lon': { required: true, bad: () => fc.constantFrom<unknown>(180.5, -181, '-74', null, Number.NaN, [], true) },
};

const UNSAFE_KEYS = ['__proto__', 'constructor', 'prototype'];

function clone<T>(v: T): T {
  return structuredClone(v);
}

/** Sets (or deletes, for undefined) the value at a dotted path, creating `location` when a coordinate is broken. */
function setPath(root: Record<string, unknown>, path: string, value: unknown): void {
  const keys = path.split('.');
  let node = root;
  for (const k of keys.slice(0, -1)) {
    if (typeof node[k] !== 'object' || node[k] === null) node[k] = k === 'location' ? { lat: 0, lon: 0 } : {};
    node = node[k] as Record<string, unknown>;
  }
  const leaf = keys[keys.length - 1];
  if (value === undefined) delete node[leaf];
  else node[leaf] = value;
}

/** Adds an own property with a prototype-reaching name, the way JSON.parse would create it. */
function addOwn(target: Record<string, unknown>, key: string, value: unknown): void {
  Object.defineProperty(target, key, { value, enumerable: true, configurable: true, writable: true });
}

const pollution = fc.array(
  fc.record({
    where: fc.constantFrom('', 'card', 'merchant'),
    key: fc.constantFrom(...UNSAFE_KEYS),
    value: fc.constantFrom<unknown>({ polluted: true }, { number: '4000000000000002', isAdmin: true }, 'x', 1, null, [{ polluted: true }]),
  }),
  { maxLength: 3 },
);

const fieldBroken: fc.Arbitrary<MalformedCase> = fc
  .tuple(validCaseArb, fc.constantFrom(...Object.keys(FIELDS)), fc.boolean())
  .chain(([c, path, remove]) => {
    const rule = FIELDS[path];
    const misplaced = panElsewhere(c, path);
    const bad = misplaced ? fc.oneof({ weight: 4, arbitrary: rule.bad(c) }, { weight: 1, arbitrary: misplaced }) : rule.bad(c);
    const value = rule.required && remove ? fc.constant<unknown>(undefined) : bad;
    return fc.tuple(fc.constant(c), fc.constant(path), value, pollution, fc.boolean());
  })
  .map(([c, path, value, extraKeys, viaJson]) => {
    const input = clone(c.payload);
    setPath(input, path, value);
    for (const { where, key, value: v } of extraKeys) {
      const target = where === '' ? input : (input[where] as Record<string, unknown> | undefined);
      if (target && typeof target === 'object' && !Array.isArray(target)) addOwn(target, key, v);
    }
    // Most bodies arrive through JSON.parse; some callers pass objects built in code.
    let sent: unknown = input;
    if (viaJson) {
      const json = JSON.stringify(input);
      sent = json === undefined ? input : JSON.parse(json);
    }
    const what = `${path} ${value === undefined ? 'deleted' : 'broken'}`;
    return { input: sent, expectPath: path, pan: c.expected.pan, what };
  })
  // JSON turns NaN and Infinity into null, which optional fields accept; skip that one combination.
  .filter((m) => !(FIELDS[m.expectPath].required === false && getPath(m.input, m.expectPath) === null));

function getPath(root: unknown, path: string): unknown {
  let node: unknown = root;
  for (const k of path.split('.')) {
    if (typeof node !== 'object' || node === null) return undefined;
    node = (node as Record<string, unknown>)[k];
  }
  return node;
}

/** The channel contradicts cardPresent: e-commerce with the card present, a contactless tap without it. */
const channelContradiction: fc.Arbitrary<MalformedCase> = fc.tuple(validCaseArb, fc.constantFrom('ecommerce', 'moto', 'contactless')).map(([c, channel]) => {
  const input = clone(c.payload);
  input.channel = channel;
  input.cardPresent = channel === 'contactless' ? false : true;
  return { input, expectPath: 'channel', pan: c.expected.pan, what: `channel ${channel} vs cardPresent` };
});

/** Amount with more decimals than the currency's minor units. */
const tooManyDecimals: fc.Arbitrary<MalformedCase> = fc.tuple(validCaseArb, fc.integer({ min: 1, max: 3 })).map(([c, extra]) => {
  const input = clone(c.payload);
  const [integer] = c.expected.amountFixed.split('.');
  input.amount = `${integer}.${'5'.repeat(c.expected.exponent + extra)}`;
  return { input, expectPath: 'amount', pan: c.expected.pan, what: `amount with ${c.expected.exponent + extra} decimals` };
});

/** Not an object at all. */
const notAnItem: fc.Arbitrary<MalformedCase> = fc.oneof(fc.constantFrom<unknown>(null, 5, 'transaction', true, [], ''), fc.array(fc.anything(), { maxLength: 3 }), fc.string()).map((input) => ({
  input,
  expectPath: '(root)',
  pan: null,
  what: 'not an object',
}));

export const malformedCaseArb: fc.Arbitrary<MalformedCase> = fc.oneof(
  { weight: 12, arbitrary: fieldBroken },
  { weight: 1, arbitrary: channelContradiction },
  { weight: 1, arbitrary: tooManyDecimals },
  { weight: 1, arbitrary: notAnItem },
);
