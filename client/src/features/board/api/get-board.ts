import { queryOptions, useQuery } from '@tanstack/react-query';
import type { BoardResponse } from '@shared/api/supervision';
import { api } from '@/lib/api-client';

/** GET /api/board: workload per person, queue age, alert volume against capacity. */
export function getBoard(signal?: AbortSignal): Promise<BoardResponse> {
  return api.get<BoardResponse>('/api/board', { signal });
}

export function boardQueryOptions() {
  return queryOptions({
    queryKey: ['board', 'summary'] as const,
    queryFn: ({ signal }) => getBoard(signal),
    // Socket events refetch it; the minute tick keeps ages and breaches honest between events.
    staleTime: 5_000,
    refetchInterval: 60_000,
  });
}

export function useBoard() {
  return useQuery(boardQueryOptions());
}
