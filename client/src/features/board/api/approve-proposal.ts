import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { CaseSummary } from '@shared/api/cases';
import { api } from '@/lib/api-client';
import { caseQueryKeys } from '@/lib/case-query-keys';
import { approvalsKey } from './get-approvals';
import { boardQueryOptions } from './get-board';

/** POST /api/approvals/:id/approve: the case closes and its labels count. A 403 `own_proposal`: someone else has to decide. */
export async function approveProposal({ id, note }: { id: number; note?: string }): Promise<CaseSummary> {
  const { case: c } = await api.post<{ case: CaseSummary }>(`/api/approvals/${id}/approve`, note ? { note } : {});
  return c;
}

/** What a decision on a proposal makes stale: the approvals, the cases and the board. */
export function invalidateAfterDecision(queryClient: ReturnType<typeof useQueryClient>) {
  void queryClient.invalidateQueries({ queryKey: approvalsKey });
  void queryClient.invalidateQueries({ queryKey: caseQueryKeys.all });
  void queryClient.invalidateQueries({ queryKey: boardQueryOptions().queryKey });
}

export function useApproveProposal() {
  const queryClient = useQueryClient();
  return useMutation({ mutationFn: approveProposal, onSettled: () => invalidateAfterDecision(queryClient) });
}
