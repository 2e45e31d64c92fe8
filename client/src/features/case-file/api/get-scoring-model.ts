import { queryOptions, useQuery } from '@tanstack/react-query';
import { parseModel, type Model } from '@shared/model/index';
import { api } from '@/lib/api-client';

/**
 * GET /api/models/:id/scoring-model: the serialised model that scored an
 * alert, parsed and checked, so the what-if panel scores in the browser with
 * exactly the server's arithmetic.
 */
export async function getScoringModel(modelId: number, signal?: AbortSignal): Promise<Model> {
  const { model } = await api.get<{ model: unknown }>(`/api/models/${modelId}/scoring-model`, { signal });
  return parseModel(model);
}

export function getScoringModelQueryOptions(modelId: number) {
  return queryOptions({
    queryKey: ['models', 'scoring-model', modelId] as const,
    queryFn: ({ signal }) => getScoringModel(modelId, signal),
    // A model version is immutable once trained.
    staleTime: Infinity,
    gcTime: 30 * 60_000,
  });
}

export function useScoringModel(modelId: number) {
  return useQuery(getScoringModelQueryOptions(modelId));
}
