import { queryOptions, useQuery } from '@tanstack/react-query';
import type { CompareResult } from '@shared/api/models';
import { api } from '@/lib/api-client';
import { MODELS_KEY } from './get-models';

export interface CompareParams {
  a: number;
  b: number;
  from?: string;
  to?: string;
}

/** GET /api/models/compare: both versions re-scored on one window's stored features. */
export function getComparison(p: CompareParams, signal?: AbortSignal): Promise<CompareResult> {
  const q = new URLSearchParams({ a: String(p.a), b: String(p.b) });
  if (p.from) q.set('from', p.from);
  if (p.to) q.set('to', p.to);
  return api.get<CompareResult>(`/api/models/compare?${q}`, { signal });
}

export function getComparisonQueryOptions(p: CompareParams) {
  return queryOptions({ queryKey: [...MODELS_KEY, 'compare', p] as const, queryFn: ({ signal }) => getComparison(p, signal), staleTime: 5 * 60_000 });
}

export function useComparison(p: CompareParams | null) {
  return useQuery({ ...getComparisonQueryOptions(p ?? { a: 0, b: 0 }), enabled: p !== null && p.a > 0 && p.b > 0 && p.a !== p.b });
}
