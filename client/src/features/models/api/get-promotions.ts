import { queryOptions, useQuery } from '@tanstack/react-query';
import type { PromotionRequest } from '@shared/api/models';
import { api } from '@/lib/api-client';
import { MODELS_KEY } from './get-models';

/** GET /api/promotions: promotion and rollback requests, pending first. */
export async function getPromotions(signal?: AbortSignal): Promise<PromotionRequest[]> {
  return (await api.get<{ requests: PromotionRequest[] }>('/api/promotions', { signal })).requests;
}

export function getPromotionsQueryOptions() {
  return queryOptions({ queryKey: [...MODELS_KEY, 'promotions'] as const, queryFn: ({ signal }) => getPromotions(signal) });
}

export function usePromotions() {
  return useQuery(getPromotionsQueryOptions());
}
