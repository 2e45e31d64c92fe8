import { queryOptions, useQuery } from '@tanstack/react-query';
import type { ModelVersionSummary } from '@shared/api/models';
import { api } from '@/lib/api-client';

export interface ModelsResponse {
  versions: ModelVersionSummary[];
  championId: number | null;
  challengerId: number | null;
}

/** Everything under this key is model-lifecycle data; a promotion makes all of it stale. */
export const MODELS_KEY = ['models'] as const;

/** GET /api/models: every version, newest first, with the active ones named. */
export function getModels(signal?: AbortSignal): Promise<ModelsResponse> {
  return api.get<ModelsResponse>('/api/models', { signal });
}

export function getModelsQueryOptions() {
  return queryOptions({ queryKey: [...MODELS_KEY, 'versions'] as const, queryFn: ({ signal }) => getModels(signal) });
}

export function useModels() {
  return useQuery(getModelsQueryOptions());
}
