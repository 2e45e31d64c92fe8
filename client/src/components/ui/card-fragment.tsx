import { cn } from '@/lib/cn';

/**
 * A card as its BIN and last four only. Whatever the caller passes, no more
 * than six leading and four trailing digits ever reach the screen.
 */
export function CardFragment({ bin, last4, className }: { bin: string; last4: string; className?: string }) {
  const first = bin.replace(/\D/g, '').slice(0, 6);
  const last = last4.replace(/\D/g, '').slice(-4);
  return (
    <span className={cn('font-mono whitespace-nowrap tabular-nums', className)} aria-label={`Card ${first}, ending ${last}`}>
      {first}
      <span aria-hidden="true" className="px-0.5 text-muted">
        •••
      </span>
      {last}
    </span>
  );
}
