import type { ReactNode } from 'react';
import { Link } from 'react-router';

/** A short full-width message in place of a screen (not found, not allowed), with the way back home. */
export function NoticePage({ title, children }: { title: string; children: ReactNode }) {
  return (
    <div className="flex max-w-prose flex-col gap-2">
      <title>{`${title} · Edgecase`}</title>
      <h1 className="text-lg font-semibold text-text">{title}</h1>
      <p className="text-sm text-muted">{children}</p>
      <p className="text-sm">
        <Link to="/" className="text-link underline underline-offset-2">
          Go to your home screen
        </Link>
      </p>
    </div>
  );
}
