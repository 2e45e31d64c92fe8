import { queryOptions, useQuery } from '@tanstack/react-query';
import type { CoverageWeek } from '@shared/api/models';
import { api } from '@/lib/api-client';
import { MODELS_KEY } from './get-models';

export const LABELS_KEY = [...MODELS_KEY, 'labels'] as const;

/** GET /api/labels/coverage: by week, the share of transactions labelled and the fraud / legitimate counts. */
export async function getLabelCoverage(weeks: number, signal?: AbortSignal): Promise<CoverageWeek[]> {
  return (await api.get<{ weeks: CoverageWeek[] }>(`/api/labels/coverage?weeks=${weeks}`, { signal })).weeks;
}

export function getLabelCoverageQueryOptions(weeks: number) {
  return queryOptions({ queryKey: [...LABELS_KEY, 'coverage', weeks] as const, queryFn: ({ signal }) => getLabelCoverage(weeks, signal), staleTime: 5 * 60_000 });
}

export function useLabelCoverage(weeks: number) {
  return useQuery(getLabelCoverageQueryOptions(weeks));
}
