import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { CaseSummary } from '@shared/api/cases';
import { api } from '@/lib/api-client';
import { invalidateAfterDecision } from './approve-proposal';

/** POST /api/approvals/:id/reject: the case goes back to its investigator with the note. */
export async function returnProposal({ id, note }: { id: number; note: string }): Promise<CaseSummary> {
  const { case: c } = await api.post<{ case: CaseSummary }>(`/api/approvals/${id}/reject`, { note });
  return c;
}

export function useReturnProposal() {
  const queryClient = useQueryClient();
  return useMutation({ mutationFn: returnProposal, onSettled: () => invalidateAfterDecision(queryClient) });
}
