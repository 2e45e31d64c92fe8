import { queryOptions, useQuery } from '@tanstack/react-query';
import type { ThresholdCurve } from '@shared/api/supervision';
import { api } from '@/lib/api-client';

/** GET /api/settings/threshold-curve: expected alerts and cases per day, precision and recall at each threshold. */
export function getThresholdCurve(days: number, signal?: AbortSignal): Promise<ThresholdCurve> {
  return api.get<ThresholdCurve>(`/api/settings/threshold-curve?days=${days}`, { signal });
}

export const thresholdCurveKey = ['settings', 'threshold-curve'] as const;

export function thresholdCurveQueryOptions(days: number) {
  return queryOptions({ queryKey: [...thresholdCurveKey, days] as const, queryFn: ({ signal }) => getThresholdCurve(days, signal), staleTime: 60_000 });
}

export function useThresholdCurve(days: number) {
  return useQuery(thresholdCurveQueryOptions(days));
}
