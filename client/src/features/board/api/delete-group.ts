import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { RoutingResponse } from '@shared/api/supervision';
import { api } from '@/lib/api-client';
import { routingQueryOptions } from './get-routing';

/** DELETE /api/routing/groups/:id; 409 `group_in_use` while a rule sends cases to it. */
export function deleteGroup(id: number): Promise<RoutingResponse> {
  return api.delete<RoutingResponse>(`/api/routing/groups/${id}`);
}

export function useDeleteGroup() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: deleteGroup,
    onSuccess: (state) => queryClient.setQueryData(routingQueryOptions().queryKey, state),
    onSettled: () => void queryClient.invalidateQueries({ queryKey: routingQueryOptions().queryKey }),
  });
}
