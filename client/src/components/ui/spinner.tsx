import { cn } from '@/lib/cn';

/** A quiet "loading" line; text first so it reads without animation. */
export function LoadingLine({ label = 'Loading…', className }: { label?: string; className?: string }) {
  return (
    <p role="status" className={cn('flex items-center gap-2 text-sm text-muted', className)}>
      <span aria-hidden="true" className="h-3 w-3 rounded-full border-2 border-control border-t-transparent motion-safe:animate-spin" />
      {label}
    </p>
  );
}
