/**
 * The Luhn (mod 10) check digit of ISO/IEC 7812-1 Annex B, used as the last
 * digit of every card number (PAN).
 *
 * Working from the rightmost digit, every second digit is doubled (a doubled
 * digit above 9 has 9 subtracted, i.e. its two digits summed); the number is
 * valid when the sum of all digits is a multiple of 10.
 */
const DIGITS = /^[0-9]+$/;

/** Sum of the Luhn weights of `digits`, doubling every second digit counting from the right, starting with the rightmost when `doubleFirst`. */
function luhnSum(digits: string, doubleFirst: boolean): number {
  let sum = 0;
  let double = doubleFirst;
  for (let i = digits.length - 1; i >= 0; i--) {
    let d = digits.charCodeAt(i) - 48;
    if (double) {
      d *= 2;
      if (d > 9) d -= 9;
    }
    sum += d;
    double = !double;
  }
  return sum;
}

/** True when `digits` (digits only, at least two) ends in a correct Luhn check digit. */
export function isLuhnValid(digits: string): boolean {
  if (typeof digits !== 'string' || digits.length < 2 || !DIGITS.test(digits)) return false;
  return luhnSum(digits, false) % 10 === 0;
}

/**
 * The check digit to append to `payload` (digits only, at least one) so the
 * whole number passes the Luhn check.
 * @throws RangeError when `payload` is empty or holds anything but digits.
 */
export function luhnCheckDigit(payload: string): string {
  if (typeof payload !== 'string' || payload.length === 0 || !DIGITS.test(payload)) {
    throw new RangeError('luhnCheckDigit needs a non-empty string of digits');
  }
  // The check digit will sit to the right, so the payload's rightmost digit is the one doubled.
  return String((10 - (luhnSum(payload, true) % 10)) % 10);
}
