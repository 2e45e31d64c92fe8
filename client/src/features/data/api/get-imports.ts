import { queryOptions, useQuery } from '@tanstack/react-query';
import { backfillImportListSchema, type BackfillImport } from '@shared/api/backfill';
import { api } from '@/lib/api-client';

/** Recent CSV imports: the caller's own; an admin gets everyone's. */
export async function getImports(signal?: AbortSignal): Promise<BackfillImport[]> {
  const { imports } = await api.get('/api/backfill', { schema: backfillImportListSchema, signal });
  return imports;
}

export function importsQueryOptions() {
  return queryOptions({
    queryKey: ['backfill', 'imports'] as const,
    queryFn: ({ signal }) => getImports(signal),
  });
}

export function useImports() {
  return useQuery(importsQueryOptions());
}
