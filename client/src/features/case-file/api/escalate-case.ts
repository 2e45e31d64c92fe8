import { escalateSchema } from '@shared/api/cases';
import { api } from '@/lib/api-client';
import { useCaseMutation } from './case-mutation';

/** POST /api/cases/:id/escalate { reason }. */
export async function escalateCase(caseId: number, reason: string): Promise<void> {
  await api.post(`/api/cases/${caseId}/escalate`, escalateSchema.parse({ reason }));
}

export function useEscalateCase(caseId: number) {
  return useCaseMutation(caseId, (reason: string) => escalateCase(caseId, reason));
}
