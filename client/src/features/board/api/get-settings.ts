import { queryOptions, useQuery } from '@tanstack/react-query';
import type { SupervisionSettingsResponse } from '@shared/api/supervision';
import { api } from '@/lib/api-client';

/** GET /api/settings/supervision: threshold, SLA policy, daily capacity and four-eyes limit. */
export function getSettings(signal?: AbortSignal): Promise<SupervisionSettingsResponse> {
  return api.get<SupervisionSettingsResponse>('/api/settings/supervision', { signal });
}

export function settingsQueryOptions() {
  return queryOptions({ queryKey: ['settings', 'supervision'] as const, queryFn: ({ signal }) => getSettings(signal) });
}

export function useSettings() {
  return useQuery(settingsQueryOptions());
}
