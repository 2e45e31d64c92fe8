import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { PromotionDecisionInput, PromotionRequest } from '@shared/api/models';
import { api } from '@/lib/api-client';
import { MODELS_KEY } from './get-models';

/** POST /api/promotions/:id/decision: a supervisor approves (the champion changes at once) or turns it down. */
export async function decidePromotion({ id, ...input }: PromotionDecisionInput & { id: number }): Promise<PromotionRequest> {
  return (await api.post<{ request: PromotionRequest }>(`/api/promotions/${id}/decision`, input)).request;
}

export function useDecidePromotion() {
  const queryClient = useQueryClient();
  // An approval changes roles everywhere: versions, shadow comparison, drift, requests.
  return useMutation({ mutationFn: decidePromotion, onSettled: () => queryClient.invalidateQueries({ queryKey: MODELS_KEY }) });
}
