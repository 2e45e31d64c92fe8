import { queryOptions, useQuery } from '@tanstack/react-query';
import type { DemoFeedState } from '@shared/api/admin';
import { api, isApiError } from '@/lib/api-client';

/** GET /api/demo/feed: the local demo feed's state; null outside the demo, where the endpoint does not exist. */
export async function getDemoFeed(signal?: AbortSignal): Promise<DemoFeedState | null> {
  try {
    const { feed } = await api.get<{ feed: DemoFeedState }>('/api/demo/feed', { signal });
    return feed;
  } catch (error) {
    if (isApiError(error) && error.status === 404) return null;
    throw error;
  }
}

export function demoFeedQueryOptions() {
  return queryOptions({
    queryKey: ['admin', 'demo-feed'] as const,
    queryFn: ({ signal }) => getDemoFeed(signal),
    // The feed reports every few seconds; its totals move while the screen is open.
    refetchInterval: 5000,
    retry: false,
  });
}

export function useDemoFeed() {
  return useQuery(demoFeedQueryOptions());
}
