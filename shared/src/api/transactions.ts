/**
 * The transaction ingest contract: what upstream systems POST to
 * /api/v1/transactions (one transaction, or `{ "transactions": [...] }`), what
 * the CSV back-fill accepts, and the validated and stored shapes.
 *
 * Pure and isomorphic: the server, the workers and the browser all use it.
 * Functions that depend on the clock take `now` from the caller.
 *
 * Card data: an issue message never carries what was sent (it could be a card
 * number in the wrong field); the card number itself travels only in
 * `ValidTransaction.card.pan`, which is not enumerable (JSON.stringify and
 * loggers skip it) and which the server's normalise step replaces by BIN, last
 * four and a keyed hash.
 */
import { z } from 'zod';
import { isLuhnValid } from '../card/luhn';
import { PAN_MAX_DIGITS, PAN_MIN_DIGITS, panDigits } from '../card/pan';
import { parseIpAddress } from '../net/ip-address';
import { isCountryCode } from '../reference/iso3166';
import { currencyExponent, isActiveCurrency, WITHDRAWN_CURRENCIES } from '../reference/iso4217';
import { isValidMcc } from '../reference/mcc';

// ---------------------------------------------------------------------------
// Constants and small types

/** Most transactions one POST may carry. */
export const MAX_BATCH_SIZE = 1000;
/** How far ahead of the caller's clock `occurredAt` may be: upstream clocks drift and time zones get mislabelled. */
export const MAX_FUTURE_MS = 24 * 60 * 60 * 1000;
/** At most 12 digits before the decimal point (10^12 - 1 major units is beyond any card transaction). */
export const MAX_AMOUNT_INTEGER_DIGITS = 12;

export const CHANNELS = ['pos', 'ecommerce', 'atm', 'moto', 'contactless'] as const;
export type Channel = (typeof CHANNELS)[number];

/** Card-not-present by definition (common practice: e-commerce and mail/telephone order never see the card). */
const CARD_NOT_PRESENT_CHANNELS: readonly Channel[] = ['ecommerce', 'moto'];
/** A contactless tap needs the card (or the device holding it) at the terminal (common practice). */
const CARD_PRESENT_CHANNELS: readonly Channel[] = ['contactless'];

export const TRANSACTION_LABELS = ['fraud', 'legitimate'] as const;
export type TransactionLabel = (typeof TRANSACTION_LABELS)[number];

/** One problem with one field. `path` is dotted and relative to the transaction (`card.number`), `(root)` for the transaction itself. */
export interface Issue {
  path: string;
  message: string;
}

export const ROOT_PATH = '(root)';

export type ValidationResult<T> = { ok: true; value: T } | { ok: false; issues: Issue[] };

export interface ValidateOptions {
  /** The caller's clock; `occurredAt` (and `labelReportedAt`) more than 24 h after it is refused. */
  now: Date;
}

// ---------------------------------------------------------------------------
// Field rules

type IssueInput = { input?: unknown };
/** zod error callback: "is required" for a missing field, "must be ..." for the wrong type. Never repeats the input. */
const expected =
  (what: string) =>
  (iss: IssueInput): string =>
    iss.input === undefined ? 'is required' : `must be ${what}`;

const CONTROL_CHARS = /[\u0000-\u001f\u007f]/; // eslint-disable-line no-control-regex
const noControlChars = (s: string): boolean => !CONTROL_CHARS.test(s);

/** A required free-text field of 1..max characters, without control characters. */
const text = (max: number) =>
  z
    .string({ error: expected('a string') })
    .min(1, 'must not be empty')
    .max(max, `must be at most ${max} characters`)
    .refine(noControlChars, 'must not contain control characters');

const ID_PATTERN = /^[A-Za-z0-9._:-]{1,64}$/;
const idSchema = z
  .string({ error: expected('a string') })
  .regex(ID_PATTERN, 'must be 1-64 characters of A-Z, a-z, 0-9 and . _ : -');

// Date-time: ISO 8601 extended format with seconds and a UTC offset, i.e. the
// RFC 3339 section 5.6 profile (date-time = full-date "T" full-time, with
// time-offset required). Lower-case "t"/"z", leap seconds and basic format are
// refused: upstream systems write the plain form.
const DATE_TIME = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2}):(\d{2})(?:\.(\d{1,9}))?(Z|([+-])(\d{2}):(\d{2}))$/;
const DATE_TIME_NO_OFFSET = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(?::\d{2}(?:\.\d+)?)?$/;
const DATE_TIME_EXAMPLE = 'an ISO 8601 date-time with seconds and an offset, e.g. 2026-11-30T14:03:00Z or 2026-11-30T09:03:00-05:00';

/** Days in a month of the proleptic Gregorian calendar (ISO 8601): leap years divisible by 4, except centuries not divisible by 400. */
function daysInMonth(year: number, month: number): number {
  if (month === 2) return (year % 4 === 0 && year % 100 !== 0) || year % 400 === 0 ? 29 : 28;
  return [4, 6, 9, 11].includes(month) ? 30 : 31;
}

export type DateTimeParse = { ok: true; date: Date } | { ok: false; message: string };

/** Parses an offset date-time (see DATE_TIME); fractions beyond milliseconds are truncated. */
export function parseOffsetDateTime(value: string): DateTimeParse {
  const m = DATE_TIME.exec(value);
  if (!m) {
    if (DATE_TIME_NO_OFFSET.test(value)) {
      return { ok: false, message: 'has no UTC offset: add Z or ±hh:mm so the moment is unambiguous' };
    }
    return { ok: false, message: `must be ${DATE_TIME_EXAMPLE}` };
  }
  const [year, month, day, hour, minute, second] = m.slice(1, 7).map(Number);
  const fraction = m[7] ?? '';
  const offHour = m[10] === undefined ? 0 : Number(m[10]);
  const offMinute = m[11] === undefined ? 0 : Number(m[11]);
  if (month < 1 || month > 12 || day < 1 || day > daysInMonth(year, month)) {
    return { ok: false, message: 'is not a real calendar date' };
  }
  if (hour > 23 || minute > 59 || second > 59) return { ok: false, message: 'is not a real time of day' };
  // RFC 3339 time-numoffset: hour 00-23, minute 00-59.
  if (offHour > 23 || offMinute > 59) return { ok: false, message: 'has an impossible UTC offset' };
  const ms = Number(fraction.slice(0, 3).padEnd(3, '0'));
  // setUTCFullYear, not Date.UTC: Date.UTC maps years 0-99 to 1900-1999.
  const d = new Date(0);
  d.setUTCFullYear(year, month - 1, day);
  d.setUTCHours(hour, minute, second, ms);
  const sign = m[9] === '-' ? -1 : 1;
  return { ok: true, date: new Date(d.getTime() - sign * (offHour * 60 + offMinute) * 60_000) };
}

// The bound against the caller's clock is applied by the validate functions,
// not here, so the schemas stay static (and compiled once).
const dateTimeSchema = z.string({ error: expected(DATE_TIME_EXAMPLE) }).superRefine((value, ctx) => {
  const parsed = parseOffsetDateTime(value);
  if (!parsed.ok) ctx.addIssue({ code: 'custom', message: parsed.message });
});

// Amount: an exact decimal. A JSON number is accepted when its ECMAScript
// shortest round-trip text (Number.prototype.toString) is such a decimal of at
// most 15 significant digits. IEEE 754 binary64 carries any decimal of up to 15
// significant digits through a round trip unchanged (DBL_DIG = 15), so that
// text is the value the sender wrote. Longer numbers are refused (send a
// string); a sender who writes 16+ digits that happen to land on a shorter
// double is beyond what JSON.parse lets anyone see.
const MAX_EXACT_NUMBER_DIGITS = 15;
const DECIMAL = /^(0|[1-9][0-9]*)(?:\.([0-9]+))?$/;
const AMOUNT_EXAMPLE = 'a decimal amount such as "42.10" (a string, or a JSON number that converts exactly)';

interface DecimalParts {
  integer: string;
  fraction: string;
}

type AmountParse = { ok: true; value: DecimalParts } | { ok: false; message: string };

/** Syntax of an amount, without the currency's minor-unit rule. */
export function parseAmountSyntax(raw: unknown): AmountParse {
  let textForm: string;
  if (typeof raw === 'number') {
    if (!Number.isFinite(raw)) return { ok: false, message: `must be ${AMOUNT_EXAMPLE}` };
    if (raw <= 0) return { ok: false, message: 'must be greater than zero' };
    textForm = String(raw);
    const significant = textForm.replace('.', '').replace(/^0+/, '').length;
    if (/e/i.test(textForm) || significant > MAX_EXACT_NUMBER_DIGITS) {
      return { ok: false, message: 'cannot be read exactly as a JSON number: send it as a decimal string such as "42.10"' };
    }
  } else if (typeof raw === 'string') {
    textForm = raw;
  } else {
    return { ok: false, message: raw === undefined ? 'is required' : `must be ${AMOUNT_EXAMPLE}` };
  }
  if (textForm.length === 0) return { ok: false, message: 'must not be empty' };
  if (/^[+-]/.test(textForm)) return { ok: false, message: 'must not carry a sign: amounts are positive decimals' };
  if (/[eE]/.test(textForm)) return { ok: false, message: 'must be plain decimal notation, without an exponent' };
  if (/[,\s'_]/.test(textForm)) return { ok: false, message: 'must not contain spaces or thousands separators' };
  const m = DECIMAL.exec(textForm);
  if (!m) {
    if (/^0[0-9]/.test(textForm) && /^[0-9.]+$/.test(textForm)) return { ok: false, message: 'must not have leading zeros' };
    return { ok: false, message: `must be ${AMOUNT_EXAMPLE}` };
  }
  const integer = m[1];
  const fraction = m[2] ?? '';
  if (integer.length > MAX_AMOUNT_INTEGER_DIGITS) {
    return { ok: false, message: `may have at most ${MAX_AMOUNT_INTEGER_DIGITS} digits before the decimal point` };
  }
  if (/^0+$/.test(integer + fraction)) return { ok: false, message: 'must be greater than zero' };
  return { ok: true, value: { integer, fraction } };
}

/** Integer minor units of a syntactically valid amount, or null when it has more decimals than `exponent` or exceeds 2^53. */
function toMinorUnits(parts: DecimalParts, exponent: number): number | null {
  if (parts.fraction.length > exponent) return null;
  const minor = Number(parts.integer + parts.fraction.padEnd(exponent, '0'));
  return Number.isSafeInteger(minor) ? minor : null;
}

const amountSchema = z.unknown().superRefine((raw, ctx) => {
  const parsed = parseAmountSyntax(raw);
  if (!parsed.ok) ctx.addIssue({ code: 'custom', message: parsed.message });
});

const currencySchema = z.string({ error: expected('an ISO 4217 currency code such as "USD"') }).superRefine((code, ctx) => {
  if (isActiveCurrency(code)) return;
  // Only a code the tables know is repeated back: the input could be anything, a card number included.
  let message = 'must be an active ISO 4217 currency code such as "USD"';
  if (Object.hasOwn(WITHDRAWN_CURRENCIES, code)) {
    const w = WITHDRAWN_CURRENCIES[code];
    message = `${code} is no longer an active ISO 4217 code: it was replaced by ${w.replacedBy}`;
  } else if (isActiveCurrency(code.toUpperCase())) {
    message = `must be upper case as ISO 4217 writes it: ${code.toUpperCase()}`;
  }
  ctx.addIssue({ code: 'custom', message });
});

const cardNumberSchema = z
  .string({ error: (iss: IssueInput) => (iss.input === undefined ? 'is required' : 'must be a string of digits (a JSON number loses digits)') })
  .superRefine((entry, ctx) => {
    const digits = panDigits(entry);
    if (digits === null) {
      ctx.addIssue({ code: 'custom', message: 'may contain only digits, spaces and dashes' });
    } else if (digits.length < PAN_MIN_DIGITS || digits.length > PAN_MAX_DIGITS) {
      ctx.addIssue({ code: 'custom', message: `must have ${PAN_MIN_DIGITS}-${PAN_MAX_DIGITS} digits` });
    } else if (!isLuhnValid(digits)) {
      ctx.addIssue({ code: 'custom', message: 'fails the Luhn check digit (ISO/IEC 7812-1): a digit is wrong' });
    }
  });

/** Card expiry as printed on the card, "MM/YY". */
const EXPIRY = /^(0[1-9]|1[0-2])\/[0-9]{2}$/;

const mccSchema = z
  .string({ error: expected('a 4-digit merchant category code (ISO 18245) as a string') })
  .refine(isValidMcc, 'must be a 4-digit merchant category code (ISO 18245), 0001-9999');

const countrySchema = z.string({ error: expected('an ISO 3166-1 alpha-2 country code such as "US"') }).superRefine((code, ctx) => {
  if (isCountryCode(code)) return;
  const message = isCountryCode(code.toUpperCase())
    ? `must be upper case as ISO 3166-1 writes it: ${code.toUpperCase()}`
    : 'must be an assigned ISO 3166-1 alpha-2 country code such as "US"';
  ctx.addIssue({ code: 'custom', message });
});

const ipSchema = z
  .string({ error: expected('an IPv4 or IPv6 address as a string') })
  .refine((s) => parseIpAddress(s) !== null, 'must be an IPv4 address (dotted decimal, no leading zeros) or an IPv6 address (RFC 4291), without a zone');

const coordinate = (limit: number) =>
  z
    .number({ error: expected('a number') })
    .min(-limit, `must be between -${limit} and ${limit}`)
    .max(limit, `must be between -${limit} and ${limit}`);

const locationSchema = z.object({ lat: coordinate(90), lon: coordinate(180) }, { error: expected('an object { lat, lon }') });

// Optional fields take null as "not given": upstream JSON often writes null for an absent value.
const baseShape = {
  id: idSchema,
  occurredAt: dateTimeSchema,
  amount: amountSchema,
  currency: currencySchema,
  card: z.object(
    {
      number: cardNumberSchema,
      cardholderId: text(64),
      expiry: z.string({ error: expected('a string "MM/YY"') }).regex(EXPIRY, 'must be "MM/YY" with a month 01-12').nullish(),
    },
    { error: expected('an object { number, cardholderId }') },
  ),
  merchant: z.object(
    {
      id: text(64),
      name: z
        .string({ error: expected('a string') })
        .trim()
        .min(1, 'must not be empty')
        .max(120, 'must be at most 120 characters')
        .refine(noControlChars, 'must not contain control characters'),
      mcc: mccSchema,
      country: countrySchema,
    },
    { error: expected('an object { id, name, mcc, country }') },
  ),
  cardPresent: z.boolean({ error: expected('true or false') }),
  channel: z.enum(CHANNELS, { error: `must be one of ${CHANNELS.join(', ')}` }).nullish(),
  deviceId: text(128).nullish(),
  ip: ipSchema.nullish(),
  location: locationSchema.nullish(),
};

// ---------------------------------------------------------------------------
// Checks across fields. They run even when a field failed (so one response
// names every problem), hence every value is re-checked for type before use.

type Ctx = z.RefinementCtx;
type Loose = Record<string, unknown>;
const isObject = (v: unknown): v is Loose => typeof v === 'object' && v !== null && !Array.isArray(v);

function checkAmountAgainstCurrency(v: Loose, ctx: Ctx): void {
  const currency = v.currency;
  if (typeof currency !== 'string' || !isActiveCurrency(currency)) return;
  const parsed = parseAmountSyntax(v.amount);
  if (!parsed.ok) return;
  const exponent = currencyExponent(currency) as number;
  if (parsed.value.fraction.length > exponent) {
    // ISO 4217 minor units: the most decimals an amount in the currency can have.
    const allowed = exponent === 0 ? 'no decimals' : `at most ${exponent} decimal${exponent === 1 ? '' : 's'}`;
    ctx.addIssue({ code: 'custom', path: ['amount'], message: `${currency} allows ${allowed} (ISO 4217 minor units)` });
  } else if (toMinorUnits(parsed.value, exponent) === null) {
    ctx.addIssue({ code: 'custom', path: ['amount'], message: 'is too large' });
  }
}

function checkChannel(v: Loose, ctx: Ctx): void {
  const channel = v.channel;
  if (typeof v.cardPresent !== 'boolean' || typeof channel !== 'string') return;
  if (v.cardPresent && CARD_NOT_PRESENT_CHANNELS.includes(channel as Channel)) {
    ctx.addIssue({ code: 'custom', path: ['channel'], message: `${channel} is a card-not-present channel, but cardPresent is true` });
  }
  if (!v.cardPresent && CARD_PRESENT_CHANNELS.includes(channel as Channel)) {
    ctx.addIssue({ code: 'custom', path: ['channel'], message: `${channel} needs the card at the terminal, but cardPresent is false` });
  }
}

/** Upstream systems sometimes put the card number into an id: refuse it there, or it would be stored readably. */
function checkPanElsewhere(v: Loose, ctx: Ctx): void {
  const card = isObject(v.card) ? v.card : undefined;
  const pan = typeof card?.number === 'string' ? panDigits(card.number) : null;
  if (pan === null || pan.length < PAN_MIN_DIGITS) return;
  const merchant = isObject(v.merchant) ? v.merchant : undefined;
  const fields: Array<[PropertyKey[], unknown]> = [
    [['id'], v.id],
    [['card', 'cardholderId'], card?.cardholderId],
    [['merchant', 'id'], merchant?.id],
    [['merchant', 'name'], merchant?.name],
    [['deviceId'], v.deviceId],
  ];
  for (const [path, value] of fields) {
    if (typeof value === 'string' && value.replace(/[^0-9]/g, '').includes(pan)) {
      ctx.addIssue({ code: 'custom', path, message: 'must not contain the card number' });
    }
  }
}

function crossFieldChecks(v: Loose, ctx: Ctx): void {
  checkAmountAgainstCurrency(v, ctx);
  checkChannel(v, ctx);
  checkPanElsewhere(v, ctx);
}

const itemError = { error: 'each transaction must be a JSON object' };
/** zod skips refinements after a failed field unless told; the input being an object is all the checks need. */
const always = { when: (payload: { value: unknown }) => isObject(payload.value) };

/**
 * The wire shape of one transaction. Every rule but the clock-dependent one
 * (`occurredAt` at most 24 h ahead of `now`), which validateTransaction adds
 * along with turning the result into a ValidTransaction.
 */
export const transactionInputSchema = z.object(baseShape, itemError).superRefine(crossFieldChecks, always);
export type TransactionInput = z.input<typeof transactionInputSchema>;

/** The batch envelope. Items are validated one by one (parseIngestBody) so one bad item does not sink the rest. */
export const transactionBatchSchema = z.object(
  {
    transactions: z
      .array(z.unknown(), { error: expected('an array of transactions') })
      .min(1, 'must hold at least one transaction')
      .max(MAX_BATCH_SIZE, `must hold at most ${MAX_BATCH_SIZE} transactions: split the batch`),
  },
  { error: 'the body must be a JSON object: one transaction, or { "transactions": [...] }' },
);
export type TransactionBatchInput = { transactions: TransactionInput[] };

// ---------------------------------------------------------------------------
// CSV back-fill: historical transactions, optionally labelled.

const CSV_TRUE = new Set(['true', '1']);
const CSV_FALSE = new Set(['false', '0']);
const csvBoolean = z.union([z.boolean(), z.string()], { error: expected('true or false') }).transform((v, ctx) => {
  if (typeof v === 'boolean') return v;
  const t = v.trim().toLowerCase();
  if (CSV_TRUE.has(t)) return true;
  if (CSV_FALSE.has(t)) return false;
  ctx.addIssue({ code: 'custom', message: 'must be true or false (or 1 or 0)' });
  return z.NEVER;
});

const CSV_NUMBER = /^-?(0|[1-9][0-9]*)(\.[0-9]+)?$/;
const csvCoordinate = (limit: number) =>
  z.preprocess(
    (v) => (typeof v === 'string' && CSV_NUMBER.test(v.trim()) ? Number(v.trim()) : v),
    coordinate(limit),
  );

// Labels as fraud systems and chargeback files write them: 1/+1/fraud, 0/-1/legit.
const FRAUD_TOKENS = new Set(['1', '+1', 'fraud']);
const LEGIT_TOKENS = new Set(['0', '-1', 'legit']);
const labelSchema = z
  .union([z.string(), z.number()], { error: expected('1, +1 or fraud; 0, -1 or legit') })
  .transform((v, ctx): TransactionLabel => {
    const t = String(v).trim().toLowerCase();
    if (FRAUD_TOKENS.has(t)) return 'fraud';
    if (LEGIT_TOKENS.has(t)) return 'legitimate';
    ctx.addIssue({ code: 'custom', message: 'must be 1, +1 or fraud; or 0, -1 or legit' });
    return z.NEVER;
  });

function checkLabel(v: Loose, ctx: Ctx): void {
  const hasLabel = v.label !== undefined && v.label !== null;
  const reported = typeof v.labelReportedAt === 'string' ? parseOffsetDateTime(v.labelReportedAt) : null;
  if (reported?.ok && !hasLabel) {
    ctx.addIssue({ code: 'custom', path: ['labelReportedAt'], message: 'is given without a label' });
  }
  const occurred = typeof v.occurredAt === 'string' ? parseOffsetDateTime(v.occurredAt) : null;
  if (reported?.ok && occurred?.ok && reported.date.getTime() < occurred.date.getTime()) {
    ctx.addIssue({ code: 'custom', path: ['labelReportedAt'], message: 'is before occurredAt: a label cannot be reported before the transaction' });
  }
}

/** One CSV back-fill row (after nestCsvRecord): the base shape, CSV spellings of booleans and numbers, and an optional label. */
export const transactionBackfillSchema = z
  .object(
    {
      ...baseShape,
      cardPresent: csvBoolean,
      location: z.object({ lat: csvCoordinate(90), lon: csvCoordinate(180) }, { error: expected('an object { lat, lon }') }).nullish(),
      label: labelSchema.nullish(),
      labelReportedAt: dateTimeSchema.nullish(),
    },
    itemError,
  )
  .superRefine((v, ctx) => {
    crossFieldChecks(v, ctx);
    checkLabel(v, ctx);
  }, always);
export type TransactionBackfillInput = z.input<typeof transactionBackfillSchema>;

const UNSAFE_KEYS = new Set(['__proto__', 'prototype', 'constructor']);

/**
 * Turns a CSV record with dotted headers (`card.number`, `merchant.mcc`,
 * `location.lat`) into the nested object the back-fill schema reads. Empty
 * cells mean "not given". Keys that could reach an object's prototype are
 * dropped; the result objects have no prototype.
 */
export function nestCsvRecord(record: Readonly<Record<string, string | undefined>>): Record<string, unknown> {
  const root: Record<string, unknown> = Object.create(null);
  for (const [header, cell] of Object.entries(record)) {
    if (cell === undefined || cell.trim() === '') continue;
    const keys = header.trim().split('.');
    if (keys.some((k) => k === '' || UNSAFE_KEYS.has(k))) continue;
    let node = root;
    let clash = false;
    for (const k of keys.slice(0, -1)) {
      const next = node[k];
      if (next === undefined) {
        const child: Record<string, unknown> = Object.create(null);
        node[k] = child;
        node = child;
      } else if (isObject(next)) {
        node = next;
      } else {
        clash = true;
        break;
      }
    }
    const leaf = keys[keys.length - 1];
    if (!clash && node[leaf] === undefined) node[leaf] = cell;
  }
  return root;
}

// ---------------------------------------------------------------------------
// Validated and stored shapes

export interface ValidTransaction {
  /** The upstream system's id: the idempotency key. */
  id: string;
  occurredAt: Date;
  /** `occurredAt` as sent, offset included. */
  occurredAtIso: string;
  /** The amount as an exact decimal string, as sent (or as the JSON number converted). */
  amount: string;
  /** Amount in integer minor units: amount × 10^currencyExponent. */
  amountMinor: number;
  currency: string;
  /** ISO 4217 minor units of `currency`. */
  currencyExponent: number;
  card: {
    /** The full card number, digits only. Not enumerable; normaliseTransaction replaces it. Never log, store or queue it. */
    readonly pan: string;
    cardholderId: string;
    /** "MM/YY", or null when not sent. */
    expiry: string | null;
  };
  merchant: { id: string; name: string; mcc: string; country: string };
  cardPresent: boolean;
  /** As sent, or `pos` when card-present and `ecommerce` when not. */
  channel: Channel;
  deviceId: string | null;
  /** Canonical text form (RFC 5952 for IPv6). */
  ip: string | null;
  location: { lat: number; lon: number } | null;
}

export interface ValidBackfillTransaction extends ValidTransaction {
  label: TransactionLabel | null;
  labelReportedAt: Date | null;
}

/** The stored transaction: no field holds the full card number. */
export interface NormalisedTransaction {
  externalId: string;
  occurredAt: Date;
  amountMinor: number;
  currency: string;
  currencyExponent: number;
  /** Major units as a float, for features; money arithmetic uses amountMinor. */
  amount: number;
  card: { bin: string; last4: string; panHash: string; cardholderId: string; expiry: string | null };
  merchant: { id: string; name: string; mcc: string; country: string };
  cardPresent: boolean;
  channel: Channel;
  deviceId: string | null;
  ip: string | null;
  lat: number | null;
  lon: number | null;
  label?: TransactionLabel;
  labelReportedAt?: Date | null;
}

// ---------------------------------------------------------------------------
// Validation

// Any run of 12+ digits (spaces and dashes allowed between) is treated as a possible card number.
const DIGIT_RUN = /[0-9](?:[ -]*[0-9]){11,}/g;

/** Last line of defence: no message carries a run of digits long enough to be a card number. */
function redact(message: string): string {
  return message.replace(DIGIT_RUN, '[redacted]');
}

function toIssues(error: z.ZodError): Issue[] {
  const seen = new Set<string>();
  const issues: Issue[] = [];
  for (const i of error.issues) {
    const path = i.path.length > 0 ? i.path.map(String).join('.') : ROOT_PATH;
    const message = redact(i.message);
    const key = `${path}\u0000${message}`;
    if (seen.has(key)) continue;
    seen.add(key);
    issues.push({ path, message });
  }
  return issues;
}

function requireNow(options: ValidateOptions | undefined): Date {
  const now = options?.now;
  if (!(now instanceof Date) || Number.isNaN(now.getTime())) throw new TypeError('validation needs { now: Date }');
  return now;
}

/** Issues for date-time fields that parse but lie more than MAX_FUTURE_MS after `now`. */
function futureIssues(input: unknown, now: Date, fields: readonly string[]): Issue[] {
  if (!isObject(input)) return [];
  const issues: Issue[] = [];
  for (const field of fields) {
    const value = input[field];
    if (typeof value !== 'string') continue;
    const parsed = parseOffsetDateTime(value);
    if (parsed.ok && parsed.date.getTime() - now.getTime() > MAX_FUTURE_MS) {
      issues.push({ path: field, message: 'is more than 24 hours in the future' });
    }
  }
  return issues;
}

type ParsedInput = z.output<typeof transactionInputSchema>;

function buildValid(d: ParsedInput): ValidTransaction {
  // The schema has checked all of these; the casts only restate it.
  const amount = parseAmountSyntax(d.amount);
  if (!amount.ok) throw new Error('unreachable: amount passed the schema');
  const exponent = currencyExponent(d.currency) as number;
  const card = { cardholderId: d.card.cardholderId, expiry: d.card.expiry ?? null } as ValidTransaction['card'];
  Object.defineProperty(card, 'pan', { value: panDigits(d.card.number) as string, enumerable: false, writable: false });
  const occurred = parseOffsetDateTime(d.occurredAt);
  if (!occurred.ok) throw new Error('unreachable: occurredAt passed the schema');
  return {
    id: d.id,
    occurredAt: occurred.date,
    occurredAtIso: d.occurredAt,
    amount: amount.value.fraction ? `${amount.value.integer}.${amount.value.fraction}` : amount.value.integer,
    amountMinor: toMinorUnits(amount.value, exponent) as number,
    currency: d.currency,
    currencyExponent: exponent,
    card,
    merchant: { id: d.merchant.id, name: d.merchant.name, mcc: d.merchant.mcc, country: d.merchant.country },
    cardPresent: d.cardPresent,
    channel: d.channel ?? (d.cardPresent ? 'pos' : 'ecommerce'),
    deviceId: d.deviceId ?? null,
    ip: d.ip == null ? null : (parseIpAddress(d.ip)?.canonical ?? null),
    location: d.location ? { lat: d.location.lat, lon: d.location.lon } : null,
  };
}

/** Validates one transaction against the contract; never throws on bad input. */
export function validateTransaction(input: unknown, options: ValidateOptions): ValidationResult<ValidTransaction> {
  const now = requireNow(options);
  const result = transactionInputSchema.safeParse(input);
  const issues = [...(result.success ? [] : toIssues(result.error)), ...futureIssues(input, now, ['occurredAt'])];
  return result.success && issues.length === 0 ? { ok: true, value: buildValid(result.data) } : { ok: false, issues };
}

/** Validates one back-fill row (nested with nestCsvRecord when it came from CSV). */
export function validateBackfillTransaction(input: unknown, options: ValidateOptions): ValidationResult<ValidBackfillTransaction> {
  const now = requireNow(options);
  const result = transactionBackfillSchema.safeParse(input);
  const issues = [...(result.success ? [] : toIssues(result.error)), ...futureIssues(input, now, ['occurredAt', 'labelReportedAt'])];
  if (!result.success || issues.length > 0) return { ok: false, issues };
  const d = result.data;
  const reported = d.labelReportedAt ? parseOffsetDateTime(d.labelReportedAt) : null;
  return {
    ok: true,
    value: { ...buildValid(d), label: d.label ?? null, labelReportedAt: reported?.ok ? reported.date : null },
  };
}

export interface IngestItem {
  /** Position in the batch (0 for a single transaction). */
  index: number;
  /** The item's id when it is a valid id, so the response can name it; null otherwise. */
  id: string | null;
  result: ValidationResult<ValidTransaction>;
}

export type IngestBodyResult = { items: IngestItem[] } | { error: Issue[] };

/**
 * Reads a POST /api/v1/transactions body: one transaction, or
 * `{ "transactions": [...] }` with 1..1000 items, each validated on its own.
 * `error` is for a body that is neither (the whole request is refused).
 */
export function parseIngestBody(body: unknown, options: ValidateOptions): IngestBodyResult {
  const now = requireNow(options);
  let list: unknown[];
  if (isObject(body) && Object.hasOwn(body, 'transactions')) {
    const envelope = transactionBatchSchema.safeParse(body);
    if (!envelope.success) return { error: toIssues(envelope.error) };
    list = envelope.data.transactions;
  } else if (isObject(body)) {
    list = [body];
  } else {
    return { error: [{ path: ROOT_PATH, message: 'the body must be a JSON object: one transaction, or { "transactions": [...] }' }] };
  }
  const items = list.map((item, index): IngestItem => {
    const result = validateTransaction(item, { now });
    if (result.ok) return { index, id: result.value.id, result };
    const rawId = isObject(item) ? item.id : undefined;
    const id = typeof rawId === 'string' && ID_PATTERN.test(rawId) && !result.issues.some((i) => i.path === 'id') ? rawId : null;
    return { index, id, result };
  });
  return { items };
}
