import { queryOptions, useQuery } from '@tanstack/react-query';
import type { ShadowComparison } from '@shared/api/models';
import { api } from '@/lib/api-client';
import { MODELS_KEY } from './get-models';

/** GET /api/models/shadow: champion and challenger on the same live transactions. */
export function getShadow(days: number, signal?: AbortSignal): Promise<ShadowComparison> {
  return api.get<ShadowComparison>(`/api/models/shadow?days=${days}`, { signal });
}

export function getShadowQueryOptions(days: number) {
  return queryOptions({ queryKey: [...MODELS_KEY, 'shadow', days] as const, queryFn: ({ signal }) => getShadow(days, signal), staleTime: 60_000 });
}

export function useShadow(days: number) {
  return useQuery(getShadowQueryOptions(days));
}
