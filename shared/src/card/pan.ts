import { isLuhnValid } from './luhn';

/**
 * Pure helpers for a card number (PAN, ISO/IEC 7812-1). What may be shown or
 * kept readably is the first six digits (the BIN, the issuer identification
 * number) and the last four: common practice under the card industry's data
 * security standard (PCI DSS), which the institution's own rules may tighten.
 */

/** ISO/IEC 7812-1 caps a PAN at 19 digits; issued card numbers are 12 digits or longer (common practice). */
export const PAN_MIN_DIGITS = 12;
export const PAN_MAX_DIGITS = 19;

const ENTRY = /^[0-9 -]+$/;

/**
 * The digits of a card number as people and upstream systems write it: digits
 * with optional spaces or dashes between groups. Returns null when anything
 * else is present or no digit is; length and Luhn are not checked here.
 */
export function panDigits(entry: string): string | null {
  if (typeof entry !== 'string' || !ENTRY.test(entry)) return null;
  const digits = entry.replace(/[ -]/g, '');
  return digits.length > 0 ? digits : null;
}

export interface PanParts {
  /** First six digits: the issuer identification number (BIN). */
  readonly bin: string;
  readonly last4: string;
}

function requireDigits(pan: string): string {
  const digits = panDigits(pan);
  if (digits === null || digits.length < PAN_MIN_DIGITS || digits.length > PAN_MAX_DIGITS) {
    // The message never carries the number itself.
    throw new RangeError(`expected a card number of ${PAN_MIN_DIGITS}-${PAN_MAX_DIGITS} digits`);
  }
  return digits;
}

/** BIN (first six) and last four digits of a card number. @throws RangeError on anything but a 12-19 digit number. */
export function panParts(pan: string): PanParts {
  const digits = requireDigits(pan);
  return { bin: digits.slice(0, 6), last4: digits.slice(-4) };
}

/** Display form showing only BIN and last four, e.g. `411111••••••1111`. @throws RangeError like panParts. */
export function maskPan(pan: string): string {
  const digits = requireDigits(pan);
  return maskFromParts({ bin: digits.slice(0, 6), last4: digits.slice(-4) }, digits.length);
}

/**
 * The same display form from stored parts, for screens that never had the
 * number. The hidden length is unknown there, so 16 digits is assumed (the most
 * common length, common practice) unless given.
 */
export function maskFromParts(parts: PanParts, length = 16): string {
  const hidden = Math.max(0, length - parts.bin.length - parts.last4.length);
  return `${parts.bin}${'•'.repeat(hidden)}${parts.last4}`;
}

const MASK = '•';
/** Digit groups joined by single spaces or dashes: how a card number is typed into free text. */
const TYPED_DIGITS = /\d+(?:[ -]\d+)*/g;

/**
 * Free text (a note, an e-mail, a reason) with every card number in it masked
 * to its BIN and last four, e.g. `4111 11•• •••• 1111`: the digits between are
 * replaced one for one, spaces and dashes stay. A card number here is a run of
 * 12-19 digits, whole digit groups of what was typed, that passes the Luhn
 * check (ISO/IEC 7812-1); runs that fail it (phone numbers, references) are
 * kept as typed. Masking is idempotent.
 */
export function maskPansInText(text: string): string {
  return text.replace(TYPED_DIGITS, (typed) => {
    // Where each digit sits in `typed`, and where each group of digits starts in that list.
    const at: number[] = [];
    const groupStarts: number[] = [];
    for (let i = 0; i < typed.length; i++) {
      if (typed[i] === ' ' || typed[i] === '-') continue;
      if (i === 0 || typed[i - 1] === ' ' || typed[i - 1] === '-') groupStarts.push(at.length);
      at.push(i);
    }
    const digits = at.map((i) => typed[i]).join('');
    const hidden = new Set<number>();
    const ends = [...groupStarts.slice(1), digits.length];
    groupStarts.forEach((from, g) => {
      for (let e = g; e < ends.length && ends[e] - from <= PAN_MAX_DIGITS; e++) {
        const to = ends[e];
        if (to - from < PAN_MIN_DIGITS || !isLuhnValid(digits.slice(from, to))) continue;
        for (let k = from + 6; k < to - 4; k++) hidden.add(at[k]);
      }
    });
    if (hidden.size === 0) return typed;
    return Array.from(typed, (ch, i) => (hidden.has(i) ? MASK : ch)).join('');
  });
}
