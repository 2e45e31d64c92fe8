import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { AuditVerification } from '@shared/api/audit';
import { api } from '@/lib/api-client';
import { auditKey } from './get-audit';

/** POST /api/audit/verify: recomputes the whole hash chain; names the first row that does not match. */
export function verifyAuditChain(): Promise<AuditVerification> {
  return api.post<AuditVerification>('/api/audit/verify');
}

export function useVerifyAuditChain() {
  const queryClient = useQueryClient();
  // The check is itself recorded, so the first page changes.
  return useMutation({ mutationFn: verifyAuditChain, onSettled: () => void queryClient.invalidateQueries({ queryKey: auditKey }) });
}
