import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import type { AuditPage } from '@shared/api/audit';
import { api } from '@/lib/api-client';
import { auditSearch, type AuditFilters } from '../utils/audit-search';

/** GET /api/audit: one page of the log, newest first. */
export function getAudit(f: AuditFilters, signal?: AbortSignal): Promise<AuditPage> {
  return api.get<AuditPage>(`/api/audit?${auditSearch(f)}`, { signal });
}

export const auditKey = ['audit'] as const;

export function auditQueryOptions(f: AuditFilters) {
  return queryOptions({ queryKey: [...auditKey, 'page', f] as const, queryFn: ({ signal }) => getAudit(f, signal), staleTime: 10_000 });
}

export function useAudit(f: AuditFilters) {
  return useQuery({ ...auditQueryOptions(f), placeholderData: keepPreviousData });
}

/** The CSV export of the same filters (every page), as a link the browser downloads. */
export function auditExportHref(f: AuditFilters): string {
  const q = auditSearch(f, { withPage: false });
  return `/api/audit/export.csv${q ? `?${q}` : ''}`;
}
