import { useId, type ReactNode } from 'react';
import { PanelBoundary } from '@/components/ui/panel-boundary';
import { cn } from '@/lib/cn';

/**
 * One section of the case file: a titled region inside its own error
 * boundary, so a failing chart or list leaves the rest of the case usable.
 */
export function Panel({
  title,
  actions,
  children,
  className,
}: {
  title: string;
  /** Small controls at the right of the title (switchers, counts). */
  actions?: ReactNode;
  children: ReactNode;
  className?: string;
}) {
  const headingId = useId();
  return (
    <section aria-labelledby={headingId} className={cn('rounded border border-border bg-surface', className)}>
      <header className="flex flex-wrap items-center justify-between gap-2 border-b border-border px-3 py-1.5">
        <h2 id={headingId} className="text-sm font-semibold text-text">
          {title}
        </h2>
        {actions}
      </header>
      <div className="p-3">
        <PanelBoundary title={title}>{children}</PanelBoundary>
      </div>
    </section>
  );
}
