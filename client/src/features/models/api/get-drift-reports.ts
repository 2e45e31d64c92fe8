import { queryOptions, useQuery } from '@tanstack/react-query';
import type { DriftReport } from '@shared/api/models';
import { api } from '@/lib/api-client';
import { MODELS_KEY } from './get-models';

export const DRIFT_KEY = [...MODELS_KEY, 'drift'] as const;

/** GET /api/drift/reports: daily reports, oldest first, of one version (or all). */
export async function getDriftReports(modelVersionId: number | null, signal?: AbortSignal): Promise<DriftReport[]> {
  const q = modelVersionId ? `?modelVersionId=${modelVersionId}` : '';
  return (await api.get<{ reports: DriftReport[] }>(`/api/drift/reports${q}`, { signal })).reports;
}

export function getDriftReportsQueryOptions(modelVersionId: number | null) {
  return queryOptions({ queryKey: [...DRIFT_KEY, modelVersionId] as const, queryFn: ({ signal }) => getDriftReports(modelVersionId, signal) });
}

export function useDriftReports(modelVersionId: number | null) {
  return useQuery(getDriftReportsQueryOptions(modelVersionId));
}
