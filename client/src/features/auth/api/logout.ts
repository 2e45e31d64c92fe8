import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api, setCsrfToken } from '@/lib/api-client';
import { replaceSessionUser } from './get-me';

export async function logout(): Promise<void> {
  await api.post<void>('/api/auth/logout');
  setCsrfToken(null);
}

export function useLogout() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: logout,
    meta: { handlesUnauthorized: true },
    // A 401 here means the session had already ended: the outcome is the same.
    onSettled: () => {
      setCsrfToken(null);
      replaceSessionUser(queryClient, null);
    },
  });
}
