/**
 * fast-check arbitraries for ingest payloads. Valid payloads are drawn from the
 * reference tables and carry, beside the payload, the values a correct
 * validator must produce, computed here by other means (BigInt arithmetic for
 * amounts, Date arithmetic for instants) so the tests do not check the code
 * against itself.
 */
import fc from 'fast-check';
import { luhnCheckDigit } from '../../../shared/src/card/luhn';
import { COUNTRY_CODES } from '../../../shared/src/reference/iso3166';
import { CURRENCY_CODES, currencyExponent } from '../../../shared/src/reference/iso4217';
import { KNOWN_MCCS } from '../../../shared/src/reference/mcc';

/** The contract's example payload (invented merchant; 4000 0000 0000 0002 is a Luhn-valid test number). */
export const examplePayload = () => ({
  id: 't-1',
  occurredAt: '2026-11-30T14:03:00Z',
  amount: '42.10',
  currency: 'USD',
  card: { number: '4000 0000 0000 0002', cardholderId: 'c-17' } as { number: string; cardholderId: string; expiry?: string },
  merchant: { id: 'm-9', name: 'Kettle & Pine Grocers', mcc: '5411', country: 'US' },
  cardPresent: true,
  channel: 'pos',
  deviceId: 'd-123',
  ip: '203.0.113.7',
  location: { lat: 40.7, lon: -74.0 },
});

/** The caller's clock in every property test. */
export const NOW = new Date('2026-12-01T12:00:00Z');
const DAY_MS = 24 * 60 * 60 * 1000;

const digit = fc.constantFrom(...'0123456789');
const digits = (min: number, max: number) => fc.string({ unit: digit, minLength: min, maxLength: max });

const ID_CHARS = 'ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789._:-';
export const idArb = fc.string({ unit: fc.constantFrom(...ID_CHARS), minLength: 1, maxLength: 64 });

// Printable text with some non-ASCII letters, as merchant and cardholder fields carry.
const TEXT_CHARS = [...'ABCdefXYZ0123456789 &-\'.,/#()', 'é', 'ß', 'ø', '–', '日', 'Ω'];
const textArb = (max: number) =>
  fc.string({ unit: fc.constantFrom(...TEXT_CHARS), minLength: 1, maxLength: max }).filter((s) => s.trim().length > 0);

export interface Expected {
  pan: string;
  amountMinor: bigint;
  /** The amount as an exact decimal with exactly `exponent` decimals ("42.10"). */
  amountFixed: string;
  /** The amount text as it was sent, when sent as a string. */
  amountText: string;
  exponent: number;
  occurredAtMs: number;
  channel: string;
  merchantName: string;
}

export interface ValidCase {
  payload: Record<string, unknown>;
  expected: Expected;
}

/** An amount for a currency: at most 12 integer digits (fewer when minor units would pass 2^53), > 0. */
function amountArb(exponent: number) {
  const maxInt = Math.min(12, 15 - exponent);
  return fc
    .tuple(fc.oneof(fc.constant('0'), fc.tuple(fc.constantFrom(...'123456789'), digits(0, maxInt - 1)).map(([a, b]) => a + b)), digits(0, exponent))
    .filter(([i, f]) => /[1-9]/.test(i + f))
    .map(([integer, fraction]) => ({ integer, fraction }));
}

/** A Luhn-valid number of 12-19 digits written with random spaces and dashes. */
const panArb = fc
  .tuple(digits(11, 18), fc.array(fc.constantFrom('', '', '', '', ' ', '-'), { minLength: 19, maxLength: 19 }))
  .map(([payload, seps]) => {
    const pan = payload + luhnCheckDigit(payload);
    const written = [...pan].map((d, i) => (i === 0 ? d : seps[i] + d)).join('');
    return { pan, written };
  });

const two = (n: number) => String(n).padStart(2, '0');

/** An instant in the three years before NOW + 24 h, written with a random offset and 0-9 fraction digits. */
const occurredAtArb = fc
  .tuple(
    fc.integer({ min: Math.floor((NOW.getTime() - 3 * 365 * DAY_MS) / 1000), max: Math.floor((NOW.getTime() + DAY_MS) / 1000) - 1 }),
    fc.integer({ min: -(23 * 60 + 59), max: 23 * 60 + 59 }),
    digits(0, 9),
    fc.constantFrom('Z', '+00:00', '-00:00'),
  )
  .map(([seconds, offsetMin, fraction, zero]) => {
    const local = new Date((seconds + offsetMin * 60) * 1000).toISOString().slice(0, 19);
    const sign = offsetMin < 0 ? '-' : '+';
    const abs = Math.abs(offsetMin);
    const offset = offsetMin === 0 ? zero : `${sign}${two(Math.floor(abs / 60))}:${two(abs % 60)}`;
    const text = `${local}${fraction ? `.${fraction}` : ''}${offset}`;
    return { text, ms: seconds * 1000 + Number(fraction.slice(0, 3).padEnd(3, '0')) };
  });

const channelFor = (cardPresent: boolean) =>
  fc.constantFrom<(string | null | undefined)[]>(...(cardPresent ? [undefined, null, 'pos', 'atm', 'contactless'] : [undefined, null, 'pos', 'atm', 'ecommerce', 'moto']));

const mccArb = fc.oneof(fc.constantFrom(...KNOWN_MCCS), fc.integer({ min: 1, max: 9999 }).map((n) => String(n).padStart(4, '0')));

const optional = <T>(arb: fc.Arbitrary<T>) => fc.option(arb, { nil: undefined, freq: 3 });

/** Payloads the contract accepts, with the values the validator must derive. */
export const validCaseArb: fc.Arbitrary<ValidCase> = fc
  .constantFrom(...CURRENCY_CODES)
  .chain((currency) => {
    const exponent = currencyExponent(currency) as number;
    return fc.record({
      currency: fc.constant(currency),
      exponent: fc.constant(exponent),
      amount: amountArb(exponent),
      asNumber: fc.boolean(),
      id: idArb,
      occurred: occurredAtArb,
      card: panArb,
      cardholderId: textArb(64),
      expiry: optional(fc.tuple(fc.integer({ min: 1, max: 12 }), fc.integer({ min: 0, max: 99 })).map(([m, y]) => `${two(m)}/${two(y)}`)),
      merchantId: textArb(64),
      merchantName: fc.tuple(textArb(110), fc.constantFrom('', ' ', '  '), fc.constantFrom('', ' ', '\t')),
      mcc: mccArb,
      country: fc.constantFrom(...COUNTRY_CODES),
      cardPresent: fc.boolean(),
      deviceId: optional(fc.oneof(textArb(128), fc.constant(null))),
      ip: optional(fc.oneof(fc.ipV4(), fc.ipV6(), fc.constant(null))),
      location: optional(fc.record({ lat: fc.double({ min: -90, max: 90, noNaN: true }), lon: fc.double({ min: -180, max: 180, noNaN: true }) })),
    });
  })
  .chain((r) => channelFor(r.cardPresent).map((channel) => ({ ...r, channel })))
  .map((r): ValidCase => {
    const amountText = r.amount.fraction ? `${r.amount.integer}.${r.amount.fraction}` : r.amount.integer;
    const significant = amountText.replace('.', '').replace(/^0+/, '').length;
    // A JSON number holds any decimal of up to 15 significant digits exactly on a round trip (IEEE 754 binary64, DBL_DIG = 15; from memory).
    const sendNumber = r.asNumber && significant <= 15;
    const minor = BigInt(r.amount.integer) * 10n ** BigInt(r.exponent) + BigInt(r.amount.fraction.padEnd(r.exponent, '0') || '0');
    const fixed = r.exponent === 0 ? r.amount.integer : `${r.amount.integer}.${r.amount.fraction.padEnd(r.exponent, '0')}`;
    const [name, lead, trail] = r.merchantName;
    const payload: Record<string, unknown> = {
      id: r.id,
      occurredAt: r.occurred.text,
      amount: sendNumber ? Number(amountText) : amountText,
      currency: r.currency,
      card: { number: r.card.written, cardholderId: r.cardholderId, ...(r.expiry === undefined ? {} : { expiry: r.expiry }) },
      merchant: { id: r.merchantId, name: lead + name + trail, mcc: r.mcc, country: r.country },
      cardPresent: r.cardPresent,
    };
    if (r.channel !== undefined) payload.channel = r.channel;
    if (r.deviceId !== undefined) payload.deviceId = r.deviceId;
    if (r.ip !== undefined) payload.ip = r.ip;
    if (r.location !== undefined) payload.location = r.location;
    return {
      payload,
      expected: {
        pan: r.card.pan,
        amountMinor: minor,
        amountFixed: fixed,
        amountText,
        exponent: r.exponent,
        occurredAtMs: r.occurred.ms,
        channel: r.channel ?? (r.cardPresent ? 'pos' : 'ecommerce'),
        merchantName: name.trim(),
      },
    };
  })
  // An id that happens to contain the card number is refused by design; keep the valid set valid.
  .filter(({ payload, expected }) =>
    [payload.id, (payload.card as Record<string, unknown>).cardholderId, (payload.merchant as Record<string, unknown>).id, (payload.merchant as Record<string, unknown>).name, payload.deviceId].every(
      (v) => typeof v !== 'string' || !v.replace(/[^0-9]/g, '').includes(expected.pan),
    ),
  );
