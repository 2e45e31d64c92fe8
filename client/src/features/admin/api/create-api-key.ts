import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { ApiKeyCreated, ApiKeyCreateInput } from '@shared/api/admin';
import { api } from '@/lib/api-client';
import { apiKeysQueryOptions } from './get-api-keys';

/** POST /api/admin/api-keys: the answer holds the key, and nothing will show it again. */
export function createApiKey(input: ApiKeyCreateInput): Promise<ApiKeyCreated> {
  return api.post<ApiKeyCreated>('/api/admin/api-keys', input);
}

export function useCreateApiKey() {
  const queryClient = useQueryClient();
  // The key itself never enters the query cache: it lives in the dialog's state until the dialog closes.
  return useMutation({ mutationFn: createApiKey, gcTime: 0, onSettled: () => void queryClient.invalidateQueries({ queryKey: apiKeysQueryOptions().queryKey }) });
}
