import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { isLuhnValid, luhnCheckDigit } from '../../../shared/src/card/luhn';

describe('Luhn check digit (ISO/IEC 7812-1 Annex B)', () => {
  // The standard worked example of the Luhn algorithm (ISO/IEC 7812-1 Annex B; from memory).
  it('accepts 79927398713 and refuses 79927398710', () => {
    expect(isLuhnValid('79927398713')).toBe(true);
    expect(isLuhnValid('79927398710')).toBe(false);
  });

  it('computes 3 as the check digit of 7992739871, and only that digit validates', () => {
    expect(luhnCheckDigit('7992739871')).toBe('3');
    for (let d = 0; d <= 9; d++) expect(isLuhnValid(`7992739871${d}`)).toBe(d === 3);
  });

  it('refuses what is not a string of at least two digits', () => {
    expect(isLuhnValid('')).toBe(false);
    expect(isLuhnValid('0')).toBe(false);
    expect(isLuhnValid('7992 7398 713')).toBe(false);
    expect(isLuhnValid('７９９２７３９８７１３')).toBe(false); // full-width digits are not ASCII digits
    expect(isLuhnValid(79927398713 as unknown as string)).toBe(false);
    expect(() => luhnCheckDigit('')).toThrow(RangeError);
    expect(() => luhnCheckDigit('12a')).toThrow(RangeError);
  });

  const payloads = fc.string({ unit: fc.constantFrom(...'0123456789'), minLength: 1, maxLength: 30 });

  // Property of the Luhn algorithm: appending the computed check digit always validates.
  it('validates every payload followed by its check digit', () => {
    fc.assert(fc.property(payloads, (p) => isLuhnValid(p + luhnCheckDigit(p))), { numRuns: 2000 });
  });

  // Property of the Luhn algorithm: it detects every single-digit error.
  it('refuses every single-digit change of a valid number', () => {
    fc.assert(
      fc.property(payloads, (p) => {
        const valid = p + luhnCheckDigit(p);
        for (let i = 0; i < valid.length; i++) {
          for (let d = 0; d <= 9; d++) {
            if (String(d) === valid[i]) continue;
            if (isLuhnValid(valid.slice(0, i) + d + valid.slice(i + 1))) return false;
          }
        }
        return true;
      }),
      { numRuns: 1000 },
    );
  });

  // Property of the Luhn algorithm (from memory): it detects every swap of two adjacent
  // different digits except 09 <-> 90.
  it('refuses adjacent transpositions other than 09/90', () => {
    fc.assert(
      fc.property(payloads, (p) => {
        const valid = p + luhnCheckDigit(p);
        for (let i = 0; i + 1 < valid.length; i++) {
          const a = valid[i];
          const b = valid[i + 1];
          if (a === b || (a === '0' && b === '9') || (a === '9' && b === '0')) continue;
          if (isLuhnValid(valid.slice(0, i) + b + a + valid.slice(i + 2))) return false;
        }
        return true;
      }),
      { numRuns: 1000 },
    );
  });
});
