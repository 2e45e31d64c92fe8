import type { Money } from '@shared/api/cases';

/** Minor units to major units, by the currency's ISO 4217 exponent (JPY 0, EUR 2, BHD 3). */
export function moneyToMajor(money: Money): number {
  return money.minor / 10 ** money.exponent;
}

const formatters = new Map<string, Intl.NumberFormat>();

function formatterFor(currency: string, exponent: number): Intl.NumberFormat {
  const key = `${currency}:${exponent}`;
  let formatter = formatters.get(key);
  if (!formatter) {
    try {
      formatter = new Intl.NumberFormat('en', {
        style: 'currency',
        currency,
        // The code, not a symbol: "$" alone does not say which dollar.
        currencyDisplay: 'code',
        minimumFractionDigits: exponent,
        maximumFractionDigits: exponent,
      });
    } catch {
      formatter = new Intl.NumberFormat('en', { minimumFractionDigits: exponent, maximumFractionDigits: exponent });
    }
    formatters.set(key, formatter);
  }
  return formatter;
}

/** "USD 1,240.00", with exactly the currency's decimals. */
export function formatMoney(money: Money): string {
  return formatterFor(money.currency, money.exponent).format(moneyToMajor(money));
}

/** "1,240.00" without the currency, for columns that state it once in the header or beside the field. */
export function formatMoneyAmount(money: Money): string {
  return moneyToMajor(money).toLocaleString('en', {
    minimumFractionDigits: money.exponent,
    maximumFractionDigits: money.exponent,
  });
}
