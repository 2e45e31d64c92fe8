import type { QueryClient } from '@tanstack/react-query';
import type { LoaderFunctionArgs } from 'react-router';
import { auditQueryOptions } from '@/features/audit/api/get-audit';
import { auditFacetsQueryOptions } from '@/features/audit/api/get-audit-facets';
import { AuditScreen } from '@/features/audit/components/audit-screen';
import { filtersFromSearch } from '@/features/audit/utils/audit-search';

/** Starts reading the page the address asks for, and the filter choices (not awaited; never throws). */
export function auditLoader(queryClient: QueryClient) {
  return ({ request }: LoaderFunctionArgs) => {
    void queryClient.prefetchQuery(auditQueryOptions(filtersFromSearch(new URL(request.url).searchParams)));
    void queryClient.prefetchQuery(auditFacetsQueryOptions());
    return null;
  };
}

export function AuditRoute() {
  return <AuditScreen />;
}
