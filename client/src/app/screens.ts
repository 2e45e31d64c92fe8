import { can, ROLE_HOME, type Capability, type Role } from '@shared/auth/roles';

/** The top-level screens, the capability each needs, and its go-to shortcut. */
export type Screen = { path: string; label: string; capability: Capability; hotkey: string };

export const SCREENS: readonly Screen[] = [
  { path: '/queue', label: 'Queue', capability: 'queue:read', hotkey: 'g q' },
  { path: '/board', label: 'Board', capability: 'board:read', hotkey: 'g b' },
  { path: '/models', label: 'Models', capability: 'models:read', hotkey: 'g m' },
  { path: '/admin', label: 'Admin', capability: 'users:manage', hotkey: 'g a' },
  { path: '/audit', label: 'Audit', capability: 'audit:read', hotkey: 'g u' },
  { path: '/data', label: 'Data', capability: 'data:backfill', hotkey: 'g d' },
];

export function screensFor(role: Role): Screen[] {
  return SCREENS.filter((screen) => can(role, screen.capability));
}

function screenOf(pathname: string): Screen | undefined {
  return SCREENS.find((s) => pathname === s.path || pathname.startsWith(`${s.path}/`));
}

/**
 * Where to go after signing in: the page asked for in `next` when it is a
 * local path this role may see, otherwise the role's home. Anything else
 * (other origins, "//host", the sign-in page itself) is ignored.
 */
export function postSignInPath(next: string | null, role: Role): string {
  const home = ROLE_HOME[role];
  if (!next || !next.startsWith('/') || next.startsWith('//') || next.startsWith('/\\')) return home;
  const pathname = next.split(/[?#]/)[0];
  if (pathname === '/' || pathname === '/sign-in') return home;
  const screen = screenOf(pathname);
  if (screen && !can(role, screen.capability)) return home;
  return next;
}

export function signInPath(location: { pathname: string; search: string; hash?: string }): string {
  const here = `${location.pathname}${location.search}${location.hash ?? ''}`;
  return here === '/' ? '/sign-in' : `/sign-in?next=${encodeURIComponent(here)}`;
}
