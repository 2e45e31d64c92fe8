import { queryOptions, useQuery } from '@tanstack/react-query';
import { backfillImportResponseSchema, type BackfillImport } from '@shared/api/backfill';
import { api } from '@/lib/api-client';

export async function getImport(id: number, signal?: AbortSignal): Promise<BackfillImport> {
  const { import: run } = await api.get(`/api/backfill/${id}`, { schema: backfillImportResponseSchema, signal });
  return run;
}

export function importQueryOptions(id: number) {
  return queryOptions({
    queryKey: ['backfill', 'import', id] as const,
    queryFn: ({ signal }) => getImport(id, signal),
  });
}

/**
 * One run's progress read from the server. The page normally follows a run
 * over the socket; `poll` is for when the socket is down, so the counts still move.
 */
export function useImport(id: number | null, { poll }: { poll: boolean }) {
  return useQuery({
    ...importQueryOptions(id ?? 0),
    enabled: id !== null && poll,
    refetchInterval: poll ? 2_000 : false,
  });
}
