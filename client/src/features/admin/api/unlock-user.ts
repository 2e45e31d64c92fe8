import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import { usersQueryOptions } from './get-users';

/** POST /api/admin/users/:id/unlock: lifts a sign-in lock-out before it runs out. */
export function unlockUser(id: number): Promise<void> {
  return api.post<void>(`/api/admin/users/${id}/unlock`);
}

export function useUnlockUser() {
  const queryClient = useQueryClient();
  return useMutation({ mutationFn: unlockUser, onSettled: () => void queryClient.invalidateQueries({ queryKey: usersQueryOptions().queryKey }) });
}
