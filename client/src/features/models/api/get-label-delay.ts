import { queryOptions, useQuery } from '@tanstack/react-query';
import type { LabelDelay } from '@shared/api/models';
import { api } from '@/lib/api-client';
import { LABELS_KEY } from './get-label-coverage';

/** GET /api/labels/delay: days from transaction to fraud report, by source. */
export function getLabelDelay(days: number, signal?: AbortSignal): Promise<LabelDelay> {
  return api.get<LabelDelay>(`/api/labels/delay?days=${days}`, { signal });
}

export function getLabelDelayQueryOptions(days: number) {
  return queryOptions({ queryKey: [...LABELS_KEY, 'delay', days] as const, queryFn: ({ signal }) => getLabelDelay(days, signal), staleTime: 5 * 60_000 });
}

export function useLabelDelay(days: number) {
  return useQuery(getLabelDelayQueryOptions(days));
}
