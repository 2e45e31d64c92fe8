import { api } from '@/lib/api-client';
import { useCaseMutation } from './case-mutation';

/** POST /api/cases/:id/release: back to the queue, unassigned. */
export async function releaseCase(caseId: number): Promise<void> {
  await api.post(`/api/cases/${caseId}/release`);
}

export function useReleaseCase(caseId: number) {
  return useCaseMutation(caseId, () => releaseCase(caseId));
}
