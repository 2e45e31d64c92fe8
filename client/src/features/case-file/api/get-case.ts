import { queryOptions, useSuspenseQuery } from '@tanstack/react-query';
import type { CaseDetail } from '@shared/api/cases';
import { api } from '@/lib/api-client';
import { caseQueryKeys } from '@/lib/case-query-keys';

/** GET /api/cases/:id: the whole case file in one answer. */
export function getCase(id: number, signal?: AbortSignal): Promise<CaseDetail> {
  return api.get<CaseDetail>(`/api/cases/${id}`, { signal });
}

export function getCaseQueryOptions(id: number) {
  return queryOptions({
    queryKey: caseQueryKeys.detail(id),
    queryFn: ({ signal }) => getCase(id, signal),
    staleTime: 15_000,
  });
}

/** The route loader has fetched it already, so this never waits on first render. */
export function useCase(id: number) {
  return useSuspenseQuery(getCaseQueryOptions(id));
}
