import { queryOptions, useQuery } from '@tanstack/react-query';
import type { ApprovalStatus, CaseApproval } from '@shared/api/supervision';
import { api } from '@/lib/api-client';

/** GET /api/approvals: proposed dispositions waiting for (or given) a second person's decision. */
export async function getApprovals(status: ApprovalStatus, signal?: AbortSignal): Promise<CaseApproval[]> {
  const { items } = await api.get<{ items: CaseApproval[] }>(`/api/approvals?status=${status}`, { signal });
  return items;
}

export const approvalsKey = ['board', 'approvals'] as const;

export function approvalsQueryOptions(status: ApprovalStatus = 'pending') {
  return queryOptions({
    queryKey: [...approvalsKey, status] as const,
    queryFn: ({ signal }) => getApprovals(status, signal),
    staleTime: 5_000,
  });
}

export function useApprovals(status: ApprovalStatus = 'pending') {
  return useQuery(approvalsQueryOptions(status));
}
