import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { PromotionRequest } from '@shared/api/models';
import { api } from '@/lib/api-client';
import { getPromotionsQueryOptions } from './get-promotions';

/** POST /api/promotions/:id/withdraw: the requester takes a pending request back. */
export async function withdrawPromotion(id: number): Promise<PromotionRequest> {
  return (await api.post<{ request: PromotionRequest }>(`/api/promotions/${id}/withdraw`, {})).request;
}

export function useWithdrawPromotion() {
  const queryClient = useQueryClient();
  return useMutation({ mutationFn: withdrawPromotion, onSettled: () => queryClient.invalidateQueries({ queryKey: getPromotionsQueryOptions().queryKey }) });
}
