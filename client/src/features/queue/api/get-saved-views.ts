import { queryOptions, useQuery } from '@tanstack/react-query';
import { savedViewsSchema, type SavedViews } from '@shared/api/cases';
import { api } from '@/lib/api-client';

/** GET /api/queue/views: this person's saved filter sets and visible columns. */
export function getSavedViews(signal?: AbortSignal): Promise<SavedViews> {
  return api.get('/api/queue/views', { schema: savedViewsSchema, signal });
}

export function getSavedViewsQueryOptions() {
  return queryOptions({
    queryKey: ['queue', 'saved-views'] as const,
    queryFn: ({ signal }) => getSavedViews(signal),
    staleTime: 5 * 60_000,
  });
}

export function useSavedViews() {
  return useQuery(getSavedViewsQueryOptions());
}
