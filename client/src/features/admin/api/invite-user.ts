import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { InviteInput } from '@shared/api/admin';
import { api } from '@/lib/api-client';
import { usersQueryOptions } from './get-users';

/** POST /api/admin/users: creates the account and e-mails a one-time link to set its password. */
export function inviteUser(input: InviteInput): Promise<{ user: { id: number; email: string } }> {
  return api.post('/api/admin/users', input);
}

export function useInviteUser() {
  const queryClient = useQueryClient();
  return useMutation({ mutationFn: inviteUser, onSettled: () => void queryClient.invalidateQueries({ queryKey: usersQueryOptions().queryKey }) });
}
