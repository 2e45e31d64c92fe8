import type { CaseDetail } from '@shared/api/cases';
import { cn } from '@/lib/cn';

type Action = CaseDetail['recommendedAction'];

const STEPS: { action: Action; label: string }[] = [
  { action: 'approve', label: 'Approve' },
  { action: 'review', label: 'Review' },
  { action: 'decline', label: 'Decline' },
];

/**
 * The band the highest alert falls in under the alerting settings. The chosen
 * step is named in words and carries a mark; the fill only repeats it.
 */
export function RecommendedAction({ action }: { action: Action }) {
  const word = STEPS.find((s) => s.action === action)?.label ?? action;
  return (
    <div className="flex flex-col gap-0.5">
      <span className="text-xs text-muted">Recommended action</span>
      <span className="inline-flex items-center gap-2">
        <span role="img" aria-label={`Recommended: ${word.toLowerCase()}`} className="inline-flex overflow-hidden rounded border border-control text-xs">
          {STEPS.map((step) => {
            const chosen = step.action === action;
            return (
              <span
                key={step.action}
                aria-hidden="true"
                className={cn(
                  'inline-flex items-center gap-1 border-r border-control px-2 py-0.5 last:border-r-0',
                  chosen ? 'bg-text font-semibold text-surface' : 'text-muted',
                )}
              >
                {chosen && (
                  <svg viewBox="0 0 12 12" className="h-2.5 w-2.5 fill-current">
                    <path d="M10.3 2.3 4.5 8.1 1.7 5.3.3 6.7l4.2 4.2 7.2-7.2-1.4-1.4Z" />
                  </svg>
                )}
                {step.label}
              </span>
            );
          })}
        </span>
      </span>
    </div>
  );
}
