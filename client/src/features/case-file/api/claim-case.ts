import type { CaseSummary } from '@shared/api/cases';
import { api } from '@/lib/api-client';
import { useCaseMutation } from './case-mutation';

/** POST /api/cases/:id/claim; a 409 names who holds it (claimConflictHolder). */
export async function claimCase(caseId: number): Promise<CaseSummary> {
  return (await api.post<{ case: CaseSummary }>(`/api/cases/${caseId}/claim`)).case;
}

export function useClaimCase(caseId: number) {
  return useCaseMutation(caseId, () => claimCase(caseId));
}
