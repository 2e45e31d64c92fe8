import { queryOptions, useQuery } from '@tanstack/react-query';
import type { LabelImport } from '@shared/api/models';
import { api } from '@/lib/api-client';
import { LABELS_KEY } from './get-label-coverage';

/** GET /api/labels/imports: the caller's recent late-label imports. */
export async function getLabelImports(signal?: AbortSignal): Promise<LabelImport[]> {
  return (await api.get<{ imports: LabelImport[] }>('/api/labels/imports', { signal })).imports;
}

export function getLabelImportsQueryOptions() {
  return queryOptions({ queryKey: [...LABELS_KEY, 'imports'] as const, queryFn: ({ signal }) => getLabelImports(signal) });
}

export function useLabelImports(enabled = true) {
  return useQuery({ ...getLabelImportsQueryOptions(), enabled });
}
