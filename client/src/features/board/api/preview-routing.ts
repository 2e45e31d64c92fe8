import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import type { RoutingPreview, RoutingRuleInput } from '@shared/api/supervision';
import { api } from '@/lib/api-client';

/** POST /api/routing/preview: how many of yesterday's cases each rule (as drafted) would have taken. A read, sent as POST for its body. */
export function previewRouting(rules: RoutingRuleInput[], signal?: AbortSignal): Promise<RoutingPreview> {
  return api.post<RoutingPreview>('/api/routing/preview', { rules }, { signal });
}

export function routingPreviewQueryOptions(rules: RoutingRuleInput[]) {
  return queryOptions({
    queryKey: ['routing', 'preview', rules] as const,
    queryFn: ({ signal }) => previewRouting(rules, signal),
    staleTime: 60_000,
  });
}

export function useRoutingPreview(rules: RoutingRuleInput[], enabled: boolean) {
  return useQuery({ ...routingPreviewQueryOptions(rules), enabled, placeholderData: keepPreviousData });
}
