/**
 * The country table against ISO 3166-1 as Debian's iso-codes package publishes
 * it (/usr/share/iso-codes/json/iso_3166-1.json; apt package `iso-codes`).
 */
import { existsSync, readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { COUNTRY_CODES, countryName, isCountryCode } from '../../../shared/src/reference/iso3166';

const FILE = '/usr/share/iso-codes/json/iso_3166-1.json';

interface IsoCountry {
  alpha_2: string;
  name: string;
  common_name?: string;
  official_name?: string;
}

function isoCountries(): IsoCountry[] {
  if (!existsSync(FILE)) throw new Error(`${FILE} is missing: apt-get install -y iso-codes`);
  return (JSON.parse(readFileSync(FILE, 'utf8')) as { '3166-1': IsoCountry[] })['3166-1'];
}

describe('ISO 3166-1 alpha-2 table (checked against Debian iso-codes)', () => {
  const theirs = isoCountries();
  const byCode = new Map(theirs.map((c) => [c.alpha_2, c]));

  it('holds only codes that iso-codes lists', () => {
    expect(COUNTRY_CODES.filter((c) => !byCode.has(c))).toEqual([]);
  });

  it('holds every alpha-2 code that iso-codes lists', () => {
    expect(theirs.map((c) => c.alpha_2).filter((c) => !isCountryCode(c))).toEqual([]);
  });

  it('names each country by one of the names iso-codes gives it', () => {
    const wrong = COUNTRY_CODES.filter((code) => {
      const c = byCode.get(code);
      return !c || ![c.name, c.common_name, c.official_name].includes(countryName(code));
    });
    expect(wrong).toEqual([]);
  });

  it('is case-sensitive and refuses user-assigned codes (ISO 3166-1 reserves AA, QM-QZ, XA-XZ, ZZ)', () => {
    expect(isCountryCode('US')).toBe(true);
    expect(isCountryCode('us')).toBe(false);
    for (const c of ['AA', 'QM', 'QZ', 'XA', 'XK', 'XZ', 'ZZ']) expect(isCountryCode(c)).toBe(false);
    // Object.prototype members are not codes.
    for (const c of ['constructor', '__proto__', 'toString']) expect(isCountryCode(c)).toBe(false);
  });
});
