const NBSP = '\u00A0';
const COUNT = new Intl.NumberFormat('en-US');

/** A count with thousands separators, e.g. "12,480". */
export const formatCount = (n: number): string => COUNT.format(n);

/** A file size in SI units, as the page states its limit ("200 MB"). */
export function formatBytes(bytes: number): string {
  if (bytes < 1000) return `${bytes}${NBSP}B`;
  const units = ['kB', 'MB', 'GB'];
  let value = bytes / 1000;
  let unit = 0;
  while (value >= 1000 && unit < units.length - 1) {
    value /= 1000;
    unit += 1;
  }
  return `${value.toFixed(value < 10 ? 1 : 0)}${NBSP}${units[unit]}`;
}

/** A share as a whole percentage, clamped to 0–100. */
export function percent(part: number, whole: number): number {
  if (whole <= 0) return 0;
  return Math.max(0, Math.min(100, Math.floor((part / whole) * 100)));
}
