import { cn } from '@/lib/cn';

/** Edgecase's mark: a square with one corner cut off, the "edge" of the case. */
export function Wordmark({ className }: { className?: string }) {
  return (
    <span className={cn('inline-flex items-center gap-1.5 font-semibold tracking-tight text-text', className)}>
      <svg aria-hidden="true" viewBox="0 0 20 20" className="h-4 w-4">
        <path d="M2 2h11l5 5v11H2z" className="fill-brand" />
        <path d="M13 2v5h5" className="fill-none stroke-surface" strokeWidth="1.5" />
      </svg>
      <span>Edgecase</span>
    </span>
  );
}
