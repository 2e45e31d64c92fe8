import { useQueryClient } from '@tanstack/react-query';
import { useEffect, useRef } from 'react';
import { caseQueryKeys } from '@/lib/case-query-keys';
import { useSocketEvent } from '@/lib/socket';
import { approvalsKey } from '../api/get-approvals';
import { boardQueryOptions } from '../api/get-board';

/** At most one refetch per this many ms however many events arrive: a burst of alerts costs one round trip. */
export const LIVE_REFRESH_MS = 1_000;

/**
 * Keeps the board live: a new alert or a changed case (claim, reassignment,
 * disposition, approval) refetches the board figures, the open cases and the
 * approvals. The socket only says "something changed"; the API stays the
 * source of truth.
 */
export function useLiveBoard(): void {
  const queryClient = useQueryClient();
  const timer = useRef<ReturnType<typeof setTimeout> | null>(null);
  useEffect(
    () => () => {
      if (timer.current) clearTimeout(timer.current);
    },
    [],
  );
  const refresh = () => {
    if (timer.current) return;
    timer.current = setTimeout(() => {
      timer.current = null;
      void queryClient.invalidateQueries({ queryKey: boardQueryOptions().queryKey });
      void queryClient.invalidateQueries({ queryKey: caseQueryKeys.lists() });
      void queryClient.invalidateQueries({ queryKey: approvalsKey });
    }, LIVE_REFRESH_MS);
  };
  useSocketEvent('queue:alert', refresh);
  useSocketEvent('queue:case-changed', refresh);
}
