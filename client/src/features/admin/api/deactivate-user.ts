import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import { usersQueryOptions } from './get-users';

/** POST /api/admin/users/:id/deactivate: every session and live screen of the person ends at once. */
export function deactivateUser(id: number): Promise<{ openCasesHeld: number }> {
  return api.post<{ openCasesHeld: number }>(`/api/admin/users/${id}/deactivate`);
}

export function useDeactivateUser() {
  const queryClient = useQueryClient();
  return useMutation({ mutationFn: deactivateUser, onSettled: () => void queryClient.invalidateQueries({ queryKey: usersQueryOptions().queryKey }) });
}
