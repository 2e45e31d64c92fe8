import { useMutation, useQueryClient } from '@tanstack/react-query';
import { caseQueryKeys } from '@/lib/case-query-keys';
import { getCaseQueryOptions } from './get-case';

/**
 * A mutation on one case. Whatever it changed, the case file and every queue
 * page that lists the case are stale afterwards, success or not (a refusal
 * often means someone else changed the case).
 */
export function useCaseMutation<TVariables, TResult>(caseId: number, mutationFn: (variables: TVariables) => Promise<TResult>) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn,
    onSettled: async () => {
      await Promise.all([
        queryClient.invalidateQueries({ queryKey: getCaseQueryOptions(caseId).queryKey }),
        queryClient.invalidateQueries({ queryKey: caseQueryKeys.lists() }),
      ]);
    },
  });
}
