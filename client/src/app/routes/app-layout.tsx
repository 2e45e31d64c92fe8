import { useQueryClient, type QueryClient } from '@tanstack/react-query';
import { useCallback, useState } from 'react';
import { Navigate, Outlet, redirect, useLocation, useMatches, type LoaderFunctionArgs } from 'react-router';
import { can } from '@shared/auth/roles';
import { LoadingLine } from '@/components/ui/spinner';
import { meQueryOptions, replaceSessionUser, useMe } from '@/features/auth/api/get-me';
import { useLogout } from '@/features/auth/api/logout';
import { setCsrfToken } from '@/lib/api-client';
import { HotkeysProvider } from '@/lib/hotkeys';
import { SocketProvider } from '@/lib/socket';
import type { RouteHandle } from '../router';
import { signInPath } from '../screens';
import { SessionUserProvider } from '../session';
import { AppShell } from '../shell/app-shell';
import { ForbiddenRoute } from './forbidden';

/** Every signed-in route passes here first: no user, no screen. */
export function appLayoutLoader(queryClient: QueryClient) {
  return async ({ request }: LoaderFunctionArgs) => {
    const user = await queryClient.ensureQueryData(meQueryOptions());
    if (!user) throw redirect(signInPath(new URL(request.url)));
    return null;
  };
}

function useRequiredCapability() {
  const matches = useMatches();
  for (let i = matches.length - 1; i >= 0; i--) {
    const capability = (matches[i].handle as RouteHandle | undefined)?.capability;
    if (capability) return capability;
  }
  return undefined;
}

export function AppLayout() {
  const { data: user } = useMe();
  const location = useLocation();
  const queryClient = useQueryClient();
  const capability = useRequiredCapability();
  const { mutate: logout, isPending: logoutPending } = useLogout();
  // A deliberate sign-out lands on a plain sign-in page; an ended session remembers where it was.
  const [signingOut, setSigningOut] = useState(false);

  const signOut = useCallback(() => {
    setSigningOut(true);
    logout();
  }, [logout]);

  const onSessionEnded = useCallback(() => {
    setCsrfToken(null);
    replaceSessionUser(queryClient, null);
  }, [queryClient]);

  if (user === null) return <Navigate to={signingOut ? '/sign-in' : signInPath(location)} replace />;
  if (user === undefined) return <LoadingLine className="p-6" />;

  const allowed = !capability || can(user.role, capability);
  return (
    <SessionUserProvider user={user}>
      <SocketProvider onSessionEnded={onSessionEnded}>
        <HotkeysProvider>
          <AppShell user={user} onSignOut={signOut} signingOut={logoutPending}>
            {allowed ? <Outlet /> : <ForbiddenRoute role={user.role} />}
          </AppShell>
        </HotkeysProvider>
      </SocketProvider>
    </SessionUserProvider>
  );
}
