/**
 * The currency table against two outside references:
 * - the codes against ISO 4217 as Debian's iso-codes publishes it
 *   (/usr/share/iso-codes/json/iso_4217.json; apt package `iso-codes`, 4.15 on
 *   Debian 12), which has no minor units;
 * - the minor units against CLDR through Python's babel
 *   (babel.numbers.get_currency_precision; apt package `python3-babel`).
 */
import { existsSync, readFileSync } from 'node:fs';
import { beforeAll, describe, expect, it } from 'vitest';
import { CURRENCY_CODES, WITHDRAWN_CURRENCIES, currencyExponent, isActiveCurrency } from '../../../shared/src/reference/iso4217';
import { pythonReference } from '../helpers/ingest-reference';

const FILE = '/usr/share/iso-codes/json/iso_4217.json';

function isoCurrencyCodes(): Set<string> {
  if (!existsSync(FILE)) throw new Error(`${FILE} is missing: apt-get install -y iso-codes`);
  return new Set((JSON.parse(readFileSync(FILE, 'utf8')) as { '4217': { alpha_3: string }[] })['4217'].map((c) => c.alpha_3));
}

/**
 * Codes added to ISO 4217 after the iso-codes release Debian 12 ships (from
 * memory of the ISO 4217 amendments): ZWG, Zimbabwe Gold (2024); XCG, the
 * Caribbean guilder of Curaçao and Sint Maarten (2025).
 */
const NEWER_THAN_ISO_CODES = ['XCG', 'ZWG'];

/**
 * Codes on List One whose minor unit ISO gives as "N.A.", left out on purpose
 * (gold, silver, platinum, palladium, SDR, the European composite units, the
 * Sucre, the ADB unit of account, testing, no currency; from memory of List One).
 */
const NO_MINOR_UNIT = ['XAG', 'XAU', 'XBA', 'XBB', 'XBC', 'XBD', 'XDR', 'XPD', 'XPT', 'XSU', 'XTS', 'XUA', 'XXX'];

/**
 * Where CLDR (babel) and ISO 4217 disagree on purpose. CLDR's `digits` records
 * the decimals in practical use, and for these currencies the minor unit is not
 * used, so CLDR says 0 while ISO 4217 List One keeps the unit (values from
 * memory of List One; the CLDR side is what babel answers).
 */
const ISO_DIFFERS_FROM_CLDR: Record<string, { iso: number; cldr: number }> = {
  AFN: { iso: 2, cldr: 0 }, // pul
  ALL: { iso: 2, cldr: 0 }, // qindarka
  IQD: { iso: 3, cldr: 0 }, // fils
  IRR: { iso: 2, cldr: 0 }, // dinar (the subunit)
  KPW: { iso: 2, cldr: 0 }, // chon
  LAK: { iso: 2, cldr: 0 }, // att
  LBP: { iso: 2, cldr: 0 }, // piastre
  MGA: { iso: 2, cldr: 0 }, // iraimbilanja (a fifth of an ariary; ISO still records 2)
  MMK: { iso: 2, cldr: 0 }, // pya
  RSD: { iso: 2, cldr: 0 }, // para
  SOS: { iso: 2, cldr: 0 }, // senti
  SYP: { iso: 2, cldr: 0 }, // piastre
  YER: { iso: 2, cldr: 0 }, // fils
};

describe('ISO 4217 codes (checked against Debian iso-codes)', () => {
  const theirs = isoCurrencyCodes();

  it('holds only codes iso-codes lists, apart from the named newer ones', () => {
    expect(CURRENCY_CODES.filter((c) => !theirs.has(c) && !NEWER_THAN_ISO_CODES.includes(c))).toEqual([]);
  });

  it('still needs each "newer" exception (fails once iso-codes catches up)', () => {
    for (const c of NEWER_THAN_ISO_CODES) {
      expect(theirs.has(c), `${c} is in iso-codes now: drop it from NEWER_THAN_ISO_CODES`).toBe(false);
      expect(isActiveCurrency(c)).toBe(true);
    }
  });

  it('leaves out only withdrawn codes and codes without a minor unit', () => {
    const missing = [...theirs].filter((c) => !isActiveCurrency(c)).sort();
    expect(missing).toEqual([...Object.keys(WITHDRAWN_CURRENCIES), ...NO_MINOR_UNIT].sort());
  });

  it('names an active successor for each withdrawn code', () => {
    for (const [code, w] of Object.entries(WITHDRAWN_CURRENCIES)) {
      expect(isActiveCurrency(code), code).toBe(false);
      expect(isActiveCurrency(w.replacedBy), `${code} -> ${w.replacedBy}`).toBe(true);
    }
  });

  it('is case-sensitive and ignores Object.prototype members', () => {
    expect(isActiveCurrency('USD')).toBe(true);
    expect(isActiveCurrency('usd')).toBe(false);
    for (const c of ['constructor', '__proto__', 'hasOwnProperty']) {
      expect(isActiveCurrency(c)).toBe(false);
      expect(currencyExponent(c)).toBeUndefined();
    }
  });
});

describe('ISO 4217 minor units (checked against CLDR via babel)', () => {
  let cldr: Map<string, number | null>;
  beforeAll(() => {
    const answers = pythonReference<number | null>('currency-precision', [...CURRENCY_CODES]);
    cldr = new Map(CURRENCY_CODES.map((c, i) => [c, answers[i]]));
  });

  it('agrees with babel for every code babel knows, except the listed ISO/CLDR differences', () => {
    const disagree = CURRENCY_CODES.filter((c) => {
      const theirs = cldr.get(c);
      return theirs !== null && theirs !== undefined && theirs !== currencyExponent(c) && !(c in ISO_DIFFERS_FROM_CLDR);
    });
    expect(disagree).toEqual([]);
  });

  it('lists only real differences: babel says what the exception says, and the table holds the ISO value', () => {
    for (const [code, { iso, cldr: expected }] of Object.entries(ISO_DIFFERS_FROM_CLDR)) {
      expect(cldr.get(code), code).toBe(expected);
      expect(currencyExponent(code), code).toBe(iso);
    }
  });

  it('leaves unchecked only the codes newer than babel (named)', () => {
    expect(CURRENCY_CODES.filter((c) => cldr.get(c) === null)).toEqual(NEWER_THAN_ISO_CODES);
  });

  it('covers the exponents the contract relies on', () => {
    // The brief's examples; each also checked against babel above.
    expect([currencyExponent('USD'), currencyExponent('JPY'), currencyExponent('BHD'), currencyExponent('KWD'), currencyExponent('CLF')]).toEqual([2, 0, 3, 3, 4]);
  });
});
