import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { Role } from '@shared/auth/roles';
import { api } from '@/lib/api-client';
import { usersQueryOptions } from './get-users';

/** PATCH /api/admin/users/:id: a new role; the person's sessions end and they sign in again. */
export function changeRole({ id, role }: { id: number; role: Role }): Promise<void> {
  return api.patch<void>(`/api/admin/users/${id}`, { role });
}

export function useChangeRole() {
  const queryClient = useQueryClient();
  return useMutation({ mutationFn: changeRole, onSettled: () => void queryClient.invalidateQueries({ queryKey: usersQueryOptions().queryKey }) });
}
