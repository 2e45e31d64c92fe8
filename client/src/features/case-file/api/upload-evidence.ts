import { EVIDENCE_MAX_BYTES, EVIDENCE_TYPES, type CaseEvidence } from '@shared/api/cases';
import { api } from '@/lib/api-client';
import { useCaseMutation } from './case-mutation';

/**
 * Why a file cannot be attached, or null when it can. The server checks the
 * content again; this only spares a wasted upload of a wrong or huge file.
 */
export function evidenceProblem(file: File): string | null {
  if (file.size === 0) return 'The file is empty.';
  if (file.size > EVIDENCE_MAX_BYTES) return `The file is larger than ${EVIDENCE_MAX_BYTES / (1024 * 1024)} MB.`;
  if (!(EVIDENCE_TYPES as readonly string[]).includes(file.type)) return 'Attach a PNG or JPEG image, a PDF or a CSV file.';
  return null;
}

/** POST /api/cases/:id/evidence, multipart field `file`. */
export async function uploadEvidence(caseId: number, file: File): Promise<CaseEvidence> {
  const problem = evidenceProblem(file);
  if (problem) throw new Error(problem);
  const form = new FormData();
  form.append('file', file, file.name);
  return (await api.post<{ evidence: CaseEvidence }>(`/api/cases/${caseId}/evidence`, form)).evidence;
}

export function evidenceDownloadUrl(caseId: number, evidenceId: number): string {
  return `/api/cases/${caseId}/evidence/${evidenceId}`;
}

export function useUploadEvidence(caseId: number) {
  return useCaseMutation(caseId, (file: File) => uploadEvidence(caseId, file));
}
