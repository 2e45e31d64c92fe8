import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import type { QueueResponse } from '@shared/api/cases';
import { api } from '@/lib/api-client';
import { caseQueryKeys } from '@/lib/case-query-keys';

/** Which open cases the board's table shows. */
export type OpenCasesFilter = { view: 'all' | 'unassigned' | 'breached' | 'person'; assignee?: number; page: number };

export const OPEN_CASES_PAGE_SIZE = 100;

function search(f: OpenCasesFilter): string {
  const p = new URLSearchParams({ sort: 'slaDue', order: 'asc', pageSize: String(OPEN_CASES_PAGE_SIZE), page: String(f.page) });
  if (f.view === 'unassigned') p.set('view', 'unassigned');
  // "Due within 0 minutes" = the deadline has passed.
  if (f.view === 'breached') p.set('dueWithinMinutes', '0');
  if (f.view === 'person' && f.assignee) p.set('assignee', String(f.assignee));
  return p.toString();
}

/** GET /api/cases sorted by SLA deadline, soonest first: the board's own table of open cases. */
export function getOpenCases(f: OpenCasesFilter, signal?: AbortSignal): Promise<QueueResponse> {
  return api.get<QueueResponse>(`/api/cases?${search(f)}`, { signal });
}

export function openCasesQueryOptions(f: OpenCasesFilter) {
  return queryOptions({
    // Under the shared case-list prefix, so any case change (here or in the Queue) refreshes it.
    queryKey: caseQueryKeys.list({ scope: 'board', ...f }),
    queryFn: ({ signal }) => getOpenCases(f, signal),
    staleTime: 5_000,
  });
}

export function useOpenCases(f: OpenCasesFilter) {
  return useQuery({ ...openCasesQueryOptions(f), placeholderData: keepPreviousData });
}
