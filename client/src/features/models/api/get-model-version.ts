import { queryOptions, useQuery } from '@tanstack/react-query';
import type { ModelVersionDetail } from '@shared/api/models';
import { api } from '@/lib/api-client';
import { MODELS_KEY } from './get-models';

/** GET /api/models/:id: one version's parameters, evaluation, curves, round table and step functions. */
export async function getModelVersion(id: number, signal?: AbortSignal): Promise<ModelVersionDetail> {
  return (await api.get<{ version: ModelVersionDetail }>(`/api/models/${id}`, { signal })).version;
}

export function getModelVersionQueryOptions(id: number) {
  // A version's evaluation never changes; only its role does, and promotions invalidate the whole models key.
  return queryOptions({ queryKey: [...MODELS_KEY, 'version', id] as const, queryFn: ({ signal }) => getModelVersion(id, signal), staleTime: 5 * 60_000 });
}

export function useModelVersion(id: number) {
  return useQuery(getModelVersionQueryOptions(id));
}
