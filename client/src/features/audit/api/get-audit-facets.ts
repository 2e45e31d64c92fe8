import { queryOptions, useQuery } from '@tanstack/react-query';
import type { AuditFacets } from '@shared/api/audit';
import { api } from '@/lib/api-client';
import { auditKey } from './get-audit';

/** GET /api/audit/facets: actions, people and record types to filter by. */
export function getAuditFacets(signal?: AbortSignal): Promise<AuditFacets> {
  return api.get<AuditFacets>('/api/audit/facets', { signal });
}

export function auditFacetsQueryOptions() {
  return queryOptions({ queryKey: [...auditKey, 'facets'] as const, queryFn: ({ signal }) => getAuditFacets(signal), staleTime: 60_000 });
}

export function useAuditFacets() {
  return useQuery(auditFacetsQueryOptions());
}
