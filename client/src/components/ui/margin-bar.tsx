import { cn } from '@/lib/cn';
import { formatMargin } from '@/lib/format';

/**
 * The normalised margin (the ensemble's vote, scaled to [-1, 1]) as a bar from
 * the centre: left leans legitimate, right leans fraud. The bar uses the
 * text colour, not the risk ramp, so the ramp keeps one meaning.
 */
export function MarginBar({ margin, showValue = true, className }: { margin: number; showValue?: boolean; className?: string }) {
  const value = Number.isFinite(margin) ? Math.max(-1, Math.min(1, margin)) : 0;
  const half = Math.abs(value) * 50;
  const leaning = value > 0 ? 'leans fraud' : value < 0 ? 'leans legitimate' : 'undecided';
  const label = `Margin ${formatMargin(value)}, ${leaning}`;
  return (
    <span className={cn('inline-flex items-center gap-1.5', className)}>
      <span
        role="meter"
        aria-label="Normalised margin"
        aria-valuemin={-1}
        aria-valuemax={1}
        aria-valuenow={Number(value.toFixed(2))}
        aria-valuetext={label}
        title={label}
        className="relative inline-block h-2 w-16 rounded-sm border border-control bg-surface"
      >
        <span aria-hidden="true" className="absolute inset-y-[-2px] left-1/2 w-px bg-control" />
        <span
          aria-hidden="true"
          className="absolute inset-y-0 bg-muted"
          style={value >= 0 ? { left: '50%', width: `${half}%` } : { right: '50%', width: `${half}%` }}
        />
      </span>
      {showValue && <span className="font-mono text-xs text-muted tabular-nums">{formatMargin(value)}</span>}
    </span>
  );
}
