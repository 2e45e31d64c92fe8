import type { z } from 'zod';
import { dispositionSchema, type CaseSummary } from '@shared/api/cases';
import { api } from '@/lib/api-client';
import { useCaseMutation } from './case-mutation';

export type DispositionValues = z.output<typeof dispositionSchema>;
export type DispositionResult = { case: CaseSummary; nextCaseId: number | null };

/**
 * POST /api/cases/:id/disposition with the schema's own output (trimmed
 * reason, empty amounts left out). 409 `stale_case`: the case changed since
 * the investigator saw `version`.
 */
export async function saveDisposition(caseId: number, values: DispositionValues): Promise<DispositionResult> {
  return api.post<DispositionResult>(`/api/cases/${caseId}/disposition`, values);
}

export function useSaveDisposition(caseId: number) {
  return useCaseMutation(caseId, (values: DispositionValues) => saveDisposition(caseId, values));
}
