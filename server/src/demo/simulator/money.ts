import type { CountryCode } from './places';

/**
 * Currencies of the demo world. Minor units are those of ISO 4217; the rates
 * are round demo figures (units per US dollar), close enough to the market
 * for amounts to look plausible, never a reference for anything.
 */
export type CurrencyCode = 'USD' | 'CAD' | 'MXN' | 'GBP' | 'EUR' | 'JPY';

interface CurrencyInfo {
  readonly minorUnits: 0 | 2;
  readonly perUsd: number;
  /** Smallest banknote a cash machine would typically dispense, for round withdrawals. */
  readonly cashStep: number;
}

export const CURRENCIES: Readonly<Record<CurrencyCode, CurrencyInfo>> = Object.freeze({
  USD: { minorUnits: 2, perUsd: 1, cashStep: 20 },
  CAD: { minorUnits: 2, perUsd: 1.37, cashStep: 20 },
  MXN: { minorUnits: 2, perUsd: 17.5, cashStep: 100 },
  GBP: { minorUnits: 2, perUsd: 0.79, cashStep: 10 },
  EUR: { minorUnits: 2, perUsd: 0.92, cashStep: 10 },
  JPY: { minorUnits: 0, perUsd: 150, cashStep: 1000 },
});

const COUNTRY_CURRENCY: Readonly<Record<CountryCode, CurrencyCode>> = Object.freeze({
  US: 'USD',
  CA: 'CAD',
  MX: 'MXN',
  GB: 'GBP',
  IE: 'EUR',
  FR: 'EUR',
  DE: 'EUR',
  ES: 'EUR',
  IT: 'EUR',
  NL: 'EUR',
  PT: 'EUR',
  JP: 'JPY',
});

export function currencyOf(country: CountryCode): CurrencyCode {
  return COUNTRY_CURRENCY[country];
}

/** A US-dollar figure as whole minor units of `currency`, never below one minor unit. */
export function usdToMinor(usd: number, currency: CurrencyCode): number {
  const c = CURRENCIES[currency];
  return Math.max(1, Math.round(usd * c.perUsd * 10 ** c.minorUnits));
}

/** A cash withdrawal of about `usd`, rounded to the local banknote step (at least one note). */
export function cashToMinor(usd: number, currency: CurrencyCode): number {
  const c = CURRENCIES[currency];
  const notes = Math.max(1, Math.round((usd * c.perUsd) / c.cashStep));
  return notes * c.cashStep * 10 ** c.minorUnits;
}

/** Minor units back to US dollars (for thresholds that are set in dollars). */
export function minorToUsd(minor: number, currency: CurrencyCode): number {
  const c = CURRENCIES[currency];
  return minor / 10 ** c.minorUnits / c.perUsd;
}

/** Exact decimal string with the currency's number of decimals, e.g. 4210 USD -> "42.10", 4210 JPY -> "4210". */
export function formatMinor(minor: number, currency: CurrencyCode): string {
  if (CURRENCIES[currency].minorUnits === 0) return String(minor);
  const cents = minor % 100;
  return `${(minor - cents) / 100}.${cents < 10 ? '0' : ''}${cents}`;
}
