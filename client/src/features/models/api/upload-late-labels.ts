import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { LabelImport } from '@shared/api/models';
import { api, isApiError } from '@/lib/api-client';
import { LABELS_KEY } from './get-label-coverage';

/**
 * POST /api/labels/imports (multipart, field "file"). A file refused as a
 * whole still carries the run (with the rows imported before the problem).
 */
export async function uploadLateLabels(file: File): Promise<{ import: LabelImport | null; error: string | null }> {
  const body = new FormData();
  body.append('file', file);
  try {
    return { import: (await api.post<{ import: LabelImport }>('/api/labels/imports', body)).import, error: null };
  } catch (err) {
    if (isApiError(err) && err.isClientError) return { import: null, error: err.message };
    throw err;
  }
}

export function useUploadLateLabels() {
  const queryClient = useQueryClient();
  // New labels change coverage, delay and the import list.
  return useMutation({ mutationFn: uploadLateLabels, onSettled: () => queryClient.invalidateQueries({ queryKey: LABELS_KEY }) });
}
