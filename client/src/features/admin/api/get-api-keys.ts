import { queryOptions, useQuery } from '@tanstack/react-query';
import type { AdminApiKey } from '@shared/api/admin';
import { api } from '@/lib/api-client';

/** GET /api/admin/api-keys: prefixes, scopes and last use; never a key itself. */
export async function getApiKeys(signal?: AbortSignal): Promise<AdminApiKey[]> {
  const { apiKeys } = await api.get<{ apiKeys: AdminApiKey[] }>('/api/admin/api-keys', { signal });
  return apiKeys;
}

export function apiKeysQueryOptions() {
  return queryOptions({ queryKey: ['admin', 'api-keys'] as const, queryFn: ({ signal }) => getApiKeys(signal) });
}

export function useApiKeys() {
  return useQuery(apiKeysQueryOptions());
}
