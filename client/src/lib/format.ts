const NBSP = '\u00A0';

/**
 * A calibrated probability as a percentage with one decimal, e.g. "87.4 %".
 * The ends never round to a certainty the model does not claim.
 */
export function formatProbability(probability: number): string {
  if (!Number.isFinite(probability)) return '–';
  const percent = probability * 100;
  if (probability > 0 && percent < 0.05) return `<${NBSP}0.1${NBSP}%`;
  if (probability < 1 && percent >= 99.95) return `>${NBSP}99.9${NBSP}%`;
  return `${percent.toFixed(1)}${NBSP}%`;
}

/** A signed margin in [-1, 1] with two decimals and an explicit sign, e.g. "+0.42". */
export function formatMargin(margin: number): string {
  if (!Number.isFinite(margin)) return '–';
  const fixed = Math.abs(margin).toFixed(2);
  if (fixed === '0.00') return '0.00';
  return `${margin < 0 ? '−' : '+'}${fixed}`;
}

/** "45 seconds", "1 minute", "15 minutes", "2 hours 5 minutes": for waits the server announces. */
export function formatWait(totalSeconds: number): string {
  const seconds = Math.max(0, Math.ceil(totalSeconds));
  const plural = (n: number, unit: string) => `${n} ${unit}${n === 1 ? '' : 's'}`;
  if (seconds < 60) return plural(seconds, 'second');
  const minutes = Math.ceil(seconds / 60);
  if (minutes < 60) return plural(minutes, 'minute');
  const hours = Math.floor(minutes / 60);
  const rest = minutes % 60;
  return rest === 0 ? plural(hours, 'hour') : `${plural(hours, 'hour')} ${plural(rest, 'minute')}`;
}
