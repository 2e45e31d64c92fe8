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
