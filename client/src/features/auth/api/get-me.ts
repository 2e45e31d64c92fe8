import { queryOptions, useQuery, type QueryClient } from '@tanstack/react-query';
import { meResponseSchema, type SessionUser } from '@shared/api/auth';
import { api, isApiError } from '@/lib/api-client';

/** The signed-in staff member, or null when nobody is signed in (401). */
export async function getMe(signal?: AbortSignal): Promise<SessionUser | null> {
  try {
    const { user } = await api.get('/api/auth/me', { schema: meResponseSchema, signal });
    return user;
  } catch (error) {
    if (isApiError(error) && error.status === 401) return null;
    throw error;
  }
}

export function meQueryOptions() {
  return queryOptions({
    queryKey: ['auth', 'me'] as const,
    queryFn: ({ signal }) => getMe(signal),
    staleTime: 60_000,
    // "Not signed in" is an answer here, not a session that just ended.
    meta: { handlesUnauthorized: true },
  });
}

export function useMe() {
  return useQuery(meQueryOptions());
}

/**
 * Records who is signed in now (null: nobody). Everything else cached belonged
 * to the previous session and may not be shown to the next person at this desk.
 */
export function replaceSessionUser(queryClient: QueryClient, user: SessionUser | null): void {
  const authScope = meQueryOptions().queryKey[0];
  queryClient.removeQueries({ predicate: (query) => query.queryKey[0] !== authScope });
  queryClient.setQueryData(meQueryOptions().queryKey, user);
}
