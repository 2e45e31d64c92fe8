import type { QueryClient } from '@tanstack/react-query';
import { apiKeysQueryOptions } from '@/features/admin/api/get-api-keys';
import { usersQueryOptions } from '@/features/admin/api/get-users';
import { AdminScreen } from '@/features/admin/components/admin-screen';
import { useSessionUser } from '../session';

/** Starts the account and key reads while the screen loads (not awaited; never throws). */
export function adminLoader(queryClient: QueryClient) {
  return () => {
    void queryClient.prefetchQuery(usersQueryOptions());
    void queryClient.prefetchQuery(apiKeysQueryOptions());
    return null;
  };
}

export function AdminRoute() {
  const user = useSessionUser();
  return <AdminScreen meId={user.id} />;
}
