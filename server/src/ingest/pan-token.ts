import { createHmac } from 'node:crypto';
import { panDigits, panParts } from '@shared/card/pan';

/**
 * Card number tokenisation. The full number goes no further than this module:
 * what leaves it is the BIN, the last four digits and a keyed hash that lets
 * the same card be matched across transactions without the number being
 * stored. A keyed hash (HMAC, RFC 2104) and not a plain SHA-256: with the BIN
 * and last four stored beside it, a 16-digit number has six unknown digits and
 * the Luhn check rules out nine in ten of their combinations, so 10^5 guesses
 * reverse an unkeyed hash.
 * PCI DSS v4.0 requirement 3.5.1.1 asks for keyed hashes of the whole PAN
 * (from memory).
 */

export interface PanToken {
  /** First six digits (issuer identification number). */
  bin: string;
  last4: string;
  /** Lower-case hex HMAC-SHA-256 of the digits-only PAN under PAN_HMAC_KEY. */
  panHash: string;
}

/** HMAC-SHA-256 (RFC 2104 with SHA-256, FIPS 180-4) of `data`, lower-case hex. Strings are UTF-8. */
export function hmacSha256Hex(key: string | Uint8Array, data: string | Uint8Array): string {
  return createHmac('sha256', key).update(data).digest('hex');
}

function requireKey(key: string | Uint8Array): void {
  if (key.length === 0) throw new RangeError('panHash needs a non-empty key (PAN_HMAC_KEY)');
}

/**
 * Keyed hash of a card number: spaces and dashes are removed first, so every
 * spelling of one number gives one hash.
 * @throws RangeError when `pan` is not digits with optional spaces or dashes, or the key is empty.
 */
export function panHash(pan: string, key: string | Uint8Array): string {
  requireKey(key);
  const digits = panDigits(pan);
  // The message never carries the number.
  if (digits === null) throw new RangeError('panHash expects a card number of digits, spaces and dashes');
  return hmacSha256Hex(key, digits);
}

/** BIN, last four and keyed hash of a card number. @throws RangeError like panParts and panHash. */
export function tokenisePan(pan: string, key: string | Uint8Array): PanToken {
  const { bin, last4 } = panParts(pan);
  return { bin, last4, panHash: panHash(pan, key) };
}
