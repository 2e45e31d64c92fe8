import { noteSchema, type CaseNote } from '@shared/api/cases';
import { api } from '@/lib/api-client';
import { useCaseMutation } from './case-mutation';

/** POST /api/cases/:id/notes { text }: plain text, shown as text. */
export async function addNote(caseId: number, text: string): Promise<CaseNote> {
  return (await api.post<{ note: CaseNote }>(`/api/cases/${caseId}/notes`, noteSchema.parse({ text }))).note;
}

export function useAddNote(caseId: number) {
  return useCaseMutation(caseId, (text: string) => addNote(caseId, text));
}
