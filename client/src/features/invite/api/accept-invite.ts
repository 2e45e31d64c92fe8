import { useMutation } from '@tanstack/react-query';
import type { AcceptInviteInput } from '@shared/api/admin';
import { api } from '@/lib/api-client';

/** POST /api/auth/accept-invite: sets the password; the link works once. */
export function acceptInvite(input: AcceptInviteInput): Promise<{ email: string }> {
  return api.post<{ email: string }>('/api/auth/accept-invite', input);
}

export function useAcceptInvite() {
  return useMutation({ mutationFn: acceptInvite, meta: { handlesUnauthorized: true } });
}
