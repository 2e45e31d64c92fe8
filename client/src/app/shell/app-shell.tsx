import type { ReactNode } from 'react';
import type { SessionUser } from '@shared/api/auth';
import { ROLE_LABELS } from '@shared/auth/roles';
import { Button } from '@/components/ui/button';
import { Wordmark } from '@/components/ui/wordmark';
import { HelpOverlay } from './help-overlay';
import { LiveIndicator } from './live-indicator';
import { MainNav } from './main-nav';
import { ThemeToggle } from './theme-toggle';

export function AppShell({
  user,
  onSignOut,
  signingOut,
  children,
}: {
  user: SessionUser;
  onSignOut: () => void;
  signingOut: boolean;
  children: ReactNode;
}) {
  return (
    <div className="flex min-h-screen flex-col bg-canvas text-text">
      <a
        href="#main"
        className="sr-only rounded bg-surface px-2 py-1 text-sm text-link focus:not-sr-only focus:absolute focus:top-2 focus:left-2 focus:z-50"
      >
        Skip to content
      </a>
      <header className="border-b border-border bg-surface">
        <div className="flex min-h-11 flex-wrap items-center gap-x-5 gap-y-1 px-4 py-1">
          <Wordmark />
          <MainNav role={user.role} />
          <div className="ml-auto flex flex-wrap items-center gap-3">
            <LiveIndicator />
            <ThemeToggle />
            <HelpOverlay />
            <span className="flex flex-col text-right leading-tight">
              <span className="text-sm font-medium text-text">{user.displayName}</span>
              <span className="text-xs text-muted">{ROLE_LABELS[user.role]}</span>
            </span>
            <Button size="sm" onClick={onSignOut} disabled={signingOut}>
              {signingOut ? 'Signing out…' : 'Sign out'}
            </Button>
          </div>
        </div>
      </header>
      <main id="main" tabIndex={-1} className="mx-auto w-full max-w-[1600px] flex-1 px-4 py-4 outline-none">
        {children}
      </main>
    </div>
  );
}
