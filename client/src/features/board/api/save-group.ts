import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { GroupInput, RoutingResponse } from '@shared/api/supervision';
import { api } from '@/lib/api-client';
import { routingQueryOptions } from './get-routing';

/** POST /api/routing/groups (new) or PUT /api/routing/groups/:id (existing); both answer the whole routing state. */
export function saveGroup({ id, ...input }: GroupInput & { id: number | null }): Promise<RoutingResponse> {
  return id === null ? api.post<RoutingResponse>('/api/routing/groups', input) : api.put<RoutingResponse>(`/api/routing/groups/${id}`, input);
}

export function useSaveGroup() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: saveGroup,
    onSuccess: (state) => queryClient.setQueryData(routingQueryOptions().queryKey, state),
    onSettled: () => void queryClient.invalidateQueries({ queryKey: routingQueryOptions().queryKey }),
  });
}
