import { queryOptions, useQuery } from '@tanstack/react-query';
import type { InviteLookup } from '@shared/api/admin';
import { api } from '@/lib/api-client';

/** POST /api/auth/invite: who a link is for, without using it. 410 `invite_invalid`: used, expired or unknown. */
export function lookupInvite(token: string, signal?: AbortSignal): Promise<InviteLookup> {
  return api.post<InviteLookup>('/api/auth/invite', { token }, { signal });
}

export function inviteQueryOptions(token: string) {
  return queryOptions({
    queryKey: ['invite', token] as const,
    queryFn: ({ signal }) => lookupInvite(token, signal),
    retry: false,
    staleTime: Infinity,
    // Nobody is signed in here: a 401 would be an answer, not an ended session.
    meta: { handlesUnauthorized: true },
  });
}

export function useInvite(token: string) {
  return useQuery({ ...inviteQueryOptions(token), enabled: token.length >= 20 });
}
