import { useMutation, useQueryClient } from '@tanstack/react-query';
import { promotionRequestSchema, type PromotionRequest, type PromotionRequestInput } from '@shared/api/models';
import { api } from '@/lib/api-client';
import { getPromotionsQueryOptions } from './get-promotions';

/** POST /api/promotions: ask a supervisor to make a version champion (promotion or rollback). */
export async function requestPromotion(input: PromotionRequestInput): Promise<PromotionRequest> {
  return (await api.post<{ request: PromotionRequest }>('/api/promotions', promotionRequestSchema.parse(input))).request;
}

export function useRequestPromotion() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: requestPromotion,
    onSettled: () => queryClient.invalidateQueries({ queryKey: getPromotionsQueryOptions().queryKey }),
  });
}
