import { describe, expect, it } from 'vitest';
import { KNOWN_MCCS, isHighRiskMcc, isValidMcc, mccInfo } from '../../../shared/src/reference/mcc';

describe('merchant category codes (ISO 18245)', () => {
  // ISO 18245: four digits; 0000 is not a code.
  it('accepts exactly four digits other than 0000', () => {
    for (const ok of ['0001', '0742', '5411', '9999']) expect(isValidMcc(ok), ok).toBe(true);
    for (const bad of ['0000', '541', '54111', '54a1', ' 5411', '5411 ', '', '５４１１']) expect(isValidMcc(bad), bad).toBe(false);
    expect(isValidMcc(5411)).toBe(false);
  });

  it('every code in the table of common codes is a valid code with a description', () => {
    for (const code of KNOWN_MCCS) {
      expect(isValidMcc(code), code).toBe(true);
      expect(mccInfo(code)?.description.length, code).toBeGreaterThan(0);
    }
  });

  // Common practice: the categories the trade treats as high-risk (codes from memory of ISO 18245).
  it('flags quasi-cash, gambling, money transfer, crypto, digital goods and jewellery', () => {
    const cases: Array<[string, string]> = [
      ['6051', 'quasi-cash and non-fiat currency (crypto)'],
      ['6011', 'ATM cash'],
      ['7995', 'betting and casino gaming'],
      ['4829', 'wire transfer and money orders'],
      ['5816', 'digital goods: games'],
      ['5818', 'digital goods: large merchants'],
      ['5944', 'jewellery stores'],
    ];
    for (const [code, what] of cases) expect(isHighRiskMcc(code), `${code} ${what}`).toBe(true);
  });

  it('does not flag everyday categories, nor codes outside the table', () => {
    for (const code of ['5411', '5812', '4111', '5912', '0001']) expect(isHighRiskMcc(code), code).toBe(false);
    expect(mccInfo('0001')).toBeUndefined();
    expect(mccInfo('constructor')).toBeUndefined();
  });
});
