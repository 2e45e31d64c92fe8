import { cn } from '@/lib/cn';
import { formatProbability } from '@/lib/format';
import { RISK_CLASSES, riskLevel } from '@/lib/risk';

/**
 * A calibrated fraud probability: the number, the step's word and the step's
 * colour together, so the colour is never the only carrier of meaning.
 */
export function RiskBadge({ probability, className }: { probability: number; className?: string }) {
  const level = riskLevel(probability);
  const classes = RISK_CLASSES[level.step];
  const text = formatProbability(probability);
  return (
    <span
      className={cn(
        'inline-flex items-center gap-1.5 rounded px-1.5 py-0.5 text-xs leading-4 whitespace-nowrap tabular-nums',
        'ring-1 ring-black/15 ring-inset dark:ring-white/25',
        classes.bg,
        classes.ink,
        className,
      )}
      data-risk-step={level.step}
      title={`Fraud probability ${text}, ${level.word} (step ${level.step} of 7)`}
    >
      <span className="font-mono font-medium">{text}</span>
      <span>{level.word}</span>
    </span>
  );
}
