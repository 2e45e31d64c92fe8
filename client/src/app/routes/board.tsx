import type { QueryClient } from '@tanstack/react-query';
import { approvalsQueryOptions } from '@/features/board/api/get-approvals';
import { boardQueryOptions } from '@/features/board/api/get-board';
import { settingsQueryOptions } from '@/features/board/api/get-settings';
import { BoardScreen } from '@/features/board/components/board-screen';
import { useSessionUser } from '../session';

/**
 * Starts the board's reads while the screen's code loads, with the same query
 * options the panels use. Not awaited: the heading and the "what needs me
 * now" line render at once and each panel fills in as its data lands.
 * Prefetching never throws, so a role without the board sees "not allowed".
 */
export function boardLoader(queryClient: QueryClient) {
  return () => {
    void queryClient.prefetchQuery(boardQueryOptions());
    void queryClient.prefetchQuery(approvalsQueryOptions('pending'));
    void queryClient.prefetchQuery(settingsQueryOptions());
    return null;
  };
}

export function BoardRoute() {
  const user = useSessionUser();
  return <BoardScreen meId={user.id} />;
}
