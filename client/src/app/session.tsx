import { createContext, useContext, type ReactNode } from 'react';
import type { SessionUser } from '@shared/api/auth';

const SessionUserContext = createContext<SessionUser | null>(null);

/** Provided by the signed-in layout, so screens below it never handle "nobody signed in". */
export function SessionUserProvider({ user, children }: { user: SessionUser; children: ReactNode }) {
  return <SessionUserContext.Provider value={user}>{children}</SessionUserContext.Provider>;
}

export function useSessionUser(): SessionUser {
  const user = useContext(SessionUserContext);
  if (!user) throw new Error('useSessionUser is only available inside the signed-in layout.');
  return user;
}
