import type { z } from 'zod';
import { cardActionSchema } from '@shared/api/cases';
import { api } from '@/lib/api-client';
import { useCaseMutation } from './case-mutation';

export type CardAction = z.output<typeof cardActionSchema>;

/** POST /api/cases/:id/card { action: block | unblock, reason }. */
export async function setCardStatus(caseId: number, input: CardAction): Promise<{ card: unknown }> {
  return api.post<{ card: unknown }>(`/api/cases/${caseId}/card`, cardActionSchema.parse(input));
}

export function useSetCardStatus(caseId: number) {
  return useCaseMutation(caseId, (input: CardAction) => setCardStatus(caseId, input));
}
