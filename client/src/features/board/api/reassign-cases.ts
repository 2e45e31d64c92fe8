import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { ReassignInput, ReassignResponse } from '@shared/api/supervision';
import { api } from '@/lib/api-client';
import { caseQueryKeys } from '@/lib/case-query-keys';
import { boardQueryOptions } from './get-board';

/** POST /api/cases/reassign: all or nothing; a 409 `reassign_refused` lists the cases that could not move. */
export function reassignCases(input: ReassignInput): Promise<ReassignResponse> {
  return api.post<ReassignResponse>('/api/cases/reassign', input);
}

export function useReassignCases() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: reassignCases,
    onSettled: () => {
      void queryClient.invalidateQueries({ queryKey: caseQueryKeys.all });
      void queryClient.invalidateQueries({ queryKey: boardQueryOptions().queryKey });
    },
  });
}
