import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { CaseSummary, QueueResponse } from '@shared/api/cases';
import { api } from '@/lib/api-client';
import { caseQueryKeys } from '@/lib/case-query-keys';
import { queueListsKey } from './get-queue';

/** POST /api/cases/:id/claim; a 409 `already_claimed` names who has it (see claimConflictHolder). */
export async function claimCase(id: number): Promise<CaseSummary> {
  const { case: claimed } = await api.post<{ case: CaseSummary }>(`/api/cases/${id}/claim`);
  return claimed;
}

export function useClaimCase() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: claimCase,
    // Nothing changes on screen until the server agrees: two people racing for
    // one case must never both see it as theirs.
    onSuccess: (claimed) => {
      queryClient.setQueriesData<QueueResponse>({ queryKey: queueListsKey }, (page) =>
        page ? { ...page, items: page.items.map((item) => (item.id === claimed.id ? claimed : item)) } : page,
      );
    },
    onSettled: (_data, _error, id) => {
      void queryClient.invalidateQueries({ queryKey: queueListsKey });
      void queryClient.invalidateQueries({ queryKey: caseQueryKeys.detail(id) });
    },
  });
}
