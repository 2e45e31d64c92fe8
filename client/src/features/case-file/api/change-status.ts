import type { z } from 'zod';
import { statusChangeSchema } from '@shared/api/cases';
import { api } from '@/lib/api-client';
import { useCaseMutation } from './case-mutation';

export type StatusChange = z.infer<typeof statusChangeSchema>['status'];

/** POST /api/cases/:id/status: waiting on the cardholder, or back to claimed. */
export async function changeStatus(caseId: number, status: StatusChange): Promise<void> {
  await api.post(`/api/cases/${caseId}/status`, statusChangeSchema.parse({ status }));
}

export function useChangeStatus(caseId: number) {
  return useCaseMutation(caseId, (status: StatusChange) => changeStatus(caseId, status));
}
