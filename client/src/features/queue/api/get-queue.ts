import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import type { QueueResponse } from '@shared/api/cases';
import { api } from '@/lib/api-client';
import { caseQueryKeys } from '@/lib/case-query-keys';
import { queueApiSearch, type QueueParams } from '../utils/queue-search';

/** GET /api/cases: one page of the queue, sorted and filtered by the server. */
export function getQueue(params: QueueParams, signal?: AbortSignal): Promise<QueueResponse> {
  return api.get<QueueResponse>(`/api/cases?${queueApiSearch(params)}`, { signal });
}

export function getQueueQueryOptions(params: QueueParams) {
  return queryOptions({
    queryKey: caseQueryKeys.list(params),
    queryFn: ({ signal }) => getQueue(params, signal),
    // Live changes arrive over the socket and refetch; a short staleness keeps
    // going back and forth between pages cheap.
    staleTime: 10_000,
  });
}

/** Every queue page and count: what a change to any case makes stale. */
export const queueListsKey = caseQueryKeys.lists();

export function useQueue(params: QueueParams) {
  // The previous page stays on screen while the next loads, so rows never blank out under the reader.
  return useQuery({ ...getQueueQueryOptions(params), placeholderData: keepPreviousData });
}
