import { cn } from '@/lib/cn';
import { slaState, type SlaState } from '@/lib/sla';
import { formatDateTime, formatSpan } from '@/lib/time';

const LOOK: Record<SlaState, { word: string; ink: string }> = {
  on_track: { word: 'in', ink: 'text-text' },
  due_soon: { word: 'urgent', ink: 'text-warn font-medium' },
  breached: { word: 'breached', ink: 'text-danger font-medium' },
};

function SlaIcon({ state }: { state: SlaState }) {
  if (state === 'breached') {
    // A filled circle with a cross: a different shape from the other two, not just a colour.
    return (
      <svg aria-hidden="true" viewBox="0 0 16 16" className="h-3.5 w-3.5 flex-none fill-current">
        <path d="M8 1a7 7 0 1 0 0 14A7 7 0 0 0 8 1Zm2.6 3.4 1 1L9 8l2.6 2.6-1 1L8 9l-2.6 2.6-1-1L7 8 4.4 5.4l1-1L8 7l2.6-2.6Z" />
      </svg>
    );
  }
  if (state === 'due_soon') {
    return (
      <svg aria-hidden="true" viewBox="0 0 16 16" className="h-3.5 w-3.5 flex-none fill-current">
        <path d="M8 1.5 15 14H1L8 1.5Zm-.75 4.5v4h1.5V6h-1.5Zm0 5v1.5h1.5V11h-1.5Z" />
      </svg>
    );
  }
  return (
    <svg aria-hidden="true" viewBox="0 0 16 16" className="h-3.5 w-3.5 flex-none fill-none stroke-current" strokeWidth="1.5">
      <circle cx="8" cy="8" r="6.25" />
      <path d="M8 4.5V8l2.5 1.5" />
    </svg>
  );
}

/**
 * Time left to the SLA deadline on the server's clock: a word and an icon say
 * on track / urgent / breached, the colour only echoes them.
 */
export function SlaCountdown({ dueAt, now, className }: { dueAt: string; now: number; className?: string }) {
  const { state, remainingMs } = slaState(dueAt, now);
  const look = LOOK[state];
  const span = Number.isFinite(remainingMs) ? formatSpan(remainingMs) : '–';
  const text = state === 'breached' ? `${look.word} ${span} ago` : state === 'due_soon' ? `${look.word}, ${span} left` : `${look.word} ${span}`;
  return (
    <span
      className={cn('inline-flex items-center gap-1 whitespace-nowrap tabular-nums', look.ink, className)}
      data-sla={state}
      title={`SLA due ${formatDateTime(dueAt)}`}
    >
      <SlaIcon state={state} />
      <span>{text}</span>
    </span>
  );
}
