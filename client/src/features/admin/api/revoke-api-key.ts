import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { AdminApiKey } from '@shared/api/admin';
import { api } from '@/lib/api-client';
import { apiKeysQueryOptions } from './get-api-keys';

/** POST /api/admin/api-keys/:id/revoke: every web server refuses the key from the next request on. */
export async function revokeApiKey(id: number): Promise<AdminApiKey[]> {
  const { apiKeys } = await api.post<{ apiKeys: AdminApiKey[] }>(`/api/admin/api-keys/${id}/revoke`);
  return apiKeys;
}

export function useRevokeApiKey() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: revokeApiKey,
    onSuccess: (keys) => queryClient.setQueryData(apiKeysQueryOptions().queryKey, keys),
    onSettled: () => void queryClient.invalidateQueries({ queryKey: apiKeysQueryOptions().queryKey }),
  });
}
