import { useMutation } from '@tanstack/react-query';
import { api } from '@/lib/api-client';

/** POST /api/drift/reports: compute the champion's report now; it arrives over the socket. */
export function runDriftReport(): Promise<{ queued: boolean }> {
  return api.post<{ queued: boolean }>('/api/drift/reports', {});
}

export function useRunDriftReport() {
  // The new report invalidates the drift queries when its socket event arrives.
  return useMutation({ mutationFn: runDriftReport });
}
