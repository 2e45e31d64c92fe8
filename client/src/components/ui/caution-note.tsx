import { cn } from '@/lib/cn';
import { SCORE_CAUTION } from '@shared/api/cases';

// One wording everywhere: the server, e-mails and screens share the same text.
export { SCORE_CAUTION };

/** The standing reminder beside every score-driven screen. Calm on purpose: it is read every shift. */
export function CautionNote({ className }: { className?: string }) {
  return (
    <aside
      aria-label="About the score"
      className={cn('flex gap-2 rounded border border-border bg-raised px-3 py-2 text-xs text-muted', className)}
    >
      <svg aria-hidden="true" viewBox="0 0 16 16" className="mt-0.5 h-3.5 w-3.5 flex-none fill-current">
        <path d="M8 1.5a6.5 6.5 0 1 0 0 13 6.5 6.5 0 0 0 0-13Zm0 1.5a5 5 0 1 1 0 10A5 5 0 0 1 8 3Zm-.75 2.25v1.5h1.5v-1.5h-1.5Zm0 2.5v3.5h1.5v-3.5h-1.5Z" />
      </svg>
      <p>{SCORE_CAUTION}</p>
    </aside>
  );
}
