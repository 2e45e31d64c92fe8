import type { ReactNode } from 'react';

/** The top of every screen: its name, and what needs the reader now. */
export function ScreenHeader({ title, children }: { title: string; children?: ReactNode }) {
  return (
    <header className="flex flex-col gap-3">
      <h1 className="text-lg font-semibold text-text">{title}</h1>
      {children}
    </header>
  );
}

/**
 * "What needs me now?": the first thing each screen answers. Screens put
 * their own count and list of urgent items inside.
 */
export function NowPanel({ children }: { children: ReactNode }) {
  return (
    <section aria-labelledby="now-heading" className="rounded border border-border bg-surface px-3 py-2">
      <h2 id="now-heading" className="text-xs font-semibold tracking-wide text-muted uppercase">
        What needs me now?
      </h2>
      <div className="mt-1 text-sm text-text">{children}</div>
    </section>
  );
}
