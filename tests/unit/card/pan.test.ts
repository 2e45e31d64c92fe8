import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { luhnCheckDigit } from '../../../shared/src/card/luhn';
import { maskFromParts, maskPan, panDigits, panParts } from '../../../shared/src/card/pan';

// Numbers below are built with the Luhn check digit on an invented payload; they are no real card's.
const PAN16 = `400000123456789${luhnCheckDigit('400000123456789')}`;

describe('PAN helpers', () => {
  it('strips spaces and dashes and refuses anything else', () => {
    expect(panDigits('4000 0012-3456 7899')).toBe('4000001234567899');
    expect(panDigits('4000.0012')).toBeNull();
    expect(panDigits('4000\t0012')).toBeNull();
    expect(panDigits(' - ')).toBeNull();
    expect(panDigits('')).toBeNull();
  });

  // Common practice (PCI DSS display rule): first six (BIN) and last four only.
  it('splits BIN and last four', () => {
    expect(panParts(PAN16)).toEqual({ bin: PAN16.slice(0, 6), last4: PAN16.slice(-4) });
    expect(panParts(PAN16.replace(/(\d{4})/g, '$1 ').trim())).toEqual(panParts(PAN16));
  });

  it('masks all but BIN and last four, one bullet per hidden digit', () => {
    expect(maskPan(PAN16)).toBe(`${PAN16.slice(0, 6)}••••••${PAN16.slice(-4)}`);
    fc.assert(
      fc.property(fc.string({ unit: fc.constantFrom(...'0123456789'), minLength: 12, maxLength: 19 }), (pan) => {
        const masked = maskPan(pan);
        expect(masked).toHaveLength(pan.length);
        expect(masked.slice(0, 6)).toBe(pan.slice(0, 6));
        expect(masked.slice(-4)).toBe(pan.slice(-4));
        expect(masked.slice(6, -4)).toMatch(/^•*$/);
        expect(masked.replace(/[^0-9]/g, '')).toHaveLength(10);
      }),
      { numRuns: 500 },
    );
    expect(maskFromParts({ bin: '400000', last4: '1234' })).toBe('400000••••••1234');
  });

  it('refuses numbers outside 12-19 digits without repeating them', () => {
    const long = '4'.repeat(20);
    expect(() => panParts('4'.repeat(11))).toThrow(RangeError);
    let caught: unknown;
    try {
      maskPan(long);
    } catch (e) {
      caught = e;
    }
    expect(caught).toBeInstanceOf(RangeError);
    expect((caught as Error).message).not.toContain(long);
  });
});
