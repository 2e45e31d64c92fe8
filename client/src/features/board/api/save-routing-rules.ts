import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { RoutingResponse, RoutingRuleInput } from '@shared/api/supervision';
import { api } from '@/lib/api-client';
import { routingQueryOptions } from './get-routing';

/** PUT /api/routing/rules: the whole ordered list; the first rule that matches takes a new case. */
export function saveRoutingRules(rules: RoutingRuleInput[]): Promise<RoutingResponse> {
  return api.put<RoutingResponse>('/api/routing/rules', { rules });
}

export function useSaveRoutingRules() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: saveRoutingRules,
    onSuccess: (state) => queryClient.setQueryData(routingQueryOptions().queryKey, state),
    onSettled: () => void queryClient.invalidateQueries({ queryKey: routingQueryOptions().queryKey }),
  });
}
