import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import { usersQueryOptions } from './get-users';

/** POST /api/admin/users/:id/invite: a fresh link; the previous one stops working. */
export function resendInvite(id: number): Promise<void> {
  return api.post<void>(`/api/admin/users/${id}/invite`);
}

export function useResendInvite() {
  const queryClient = useQueryClient();
  return useMutation({ mutationFn: resendInvite, onSettled: () => void queryClient.invalidateQueries({ queryKey: usersQueryOptions().queryKey }) });
}
