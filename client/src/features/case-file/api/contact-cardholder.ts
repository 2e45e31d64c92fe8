import type { z } from 'zod';
import { contactSchema, type CaseMessage } from '@shared/api/cases';
import { api } from '@/lib/api-client';
import { useCaseMutation } from './case-mutation';

export type ContactInput = z.output<typeof contactSchema>;

/** POST /api/cases/:id/contact { subject, message }: an e-mail to the cardholder, listed with the case's messages. */
export async function contactCardholder(caseId: number, input: ContactInput): Promise<CaseMessage> {
  return (await api.post<{ message: CaseMessage }>(`/api/cases/${caseId}/contact`, contactSchema.parse(input))).message;
}

export function useContactCardholder(caseId: number) {
  return useCaseMutation(caseId, (input: ContactInput) => contactCardholder(caseId, input));
}
