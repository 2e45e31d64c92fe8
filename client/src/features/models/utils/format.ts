const NBSP = '\u00A0';

/** A share as a percentage with one decimal ("12.5 %"), or a dash when unknown. */
export function pct(x: number | null | undefined, decimals = 1): string {
  return x === null || x === undefined || !Number.isFinite(x) ? '–' : `${(x * 100).toFixed(decimals)}${NBSP}%`;
}

/** A metric with fixed decimals ("0.912"), or a dash. */
export function num(x: number | null | undefined, decimals = 3): string {
  return x === null || x === undefined || !Number.isFinite(x) ? '–' : x.toFixed(decimals);
}

/** A whole count with thousands separators. */
export function count(x: number | null | undefined): string {
  return x === null || x === undefined || !Number.isFinite(x) ? '–' : Math.round(x).toLocaleString('en-GB');
}

/** "14 Mar 2026" (UTC date of an ISO instant). */
export function day(iso: string | null | undefined): string {
  if (!iso) return '–';
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return '–';
  return d.toLocaleDateString('en-GB', { day: 'numeric', month: 'short', year: 'numeric', timeZone: 'UTC' });
}

export function windowText(from: string | null | undefined, to: string | null | undefined): string {
  return `${day(from)} – ${day(to)}`;
}

/** "1 min 12 s", "840 ms". */
export function duration(seconds: number | null | undefined): string {
  if (seconds === null || seconds === undefined || !Number.isFinite(seconds)) return '–';
  if (seconds < 1) return `${Math.round(seconds * 1000)} ms`;
  if (seconds < 60) return `${seconds.toFixed(1)} s`;
  return `${Math.floor(seconds / 60)} min ${Math.round(seconds % 60)} s`;
}
