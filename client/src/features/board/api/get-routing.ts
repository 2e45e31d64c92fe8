import { queryOptions, useQuery } from '@tanstack/react-query';
import type { RoutingResponse } from '@shared/api/supervision';
import { api } from '@/lib/api-client';

/** GET /api/routing: investigator groups, the ordered routing rules, and who can be in a group. */
export function getRouting(signal?: AbortSignal): Promise<RoutingResponse> {
  return api.get<RoutingResponse>('/api/routing', { signal });
}

export function routingQueryOptions() {
  return queryOptions({ queryKey: ['routing'] as const, queryFn: ({ signal }) => getRouting(signal) });
}

export function useRouting() {
  return useQuery(routingQueryOptions());
}
