import { queryOptions, useQuery } from '@tanstack/react-query';
import type { AdminUser } from '@shared/api/admin';
import { api } from '@/lib/api-client';

/** GET /api/admin/users: every staff account with role, status and lock-out. */
export async function getUsers(signal?: AbortSignal): Promise<AdminUser[]> {
  const { users } = await api.get<{ users: AdminUser[] }>('/api/admin/users', { signal });
  return users;
}

export function usersQueryOptions() {
  return queryOptions({ queryKey: ['admin', 'users'] as const, queryFn: ({ signal }) => getUsers(signal) });
}

export function useUsers() {
  return useQuery(usersQueryOptions());
}
