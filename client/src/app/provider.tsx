import { QueryClientProvider, type QueryClient } from '@tanstack/react-query';
import type { ReactNode } from 'react';
import { replaceSessionUser } from '@/features/auth/api/get-me';
import { setCsrfToken } from '@/lib/api-client';
import { createQueryClient } from '@/lib/query-client';
import { ThemeProvider } from '@/lib/theme';

/** The app's query client: any unexpected 401 means the session ended, so forget the user and their data. */
export function createAppQueryClient(): QueryClient {
  const queryClient: QueryClient = createQueryClient({
    onUnauthorized: () => {
      setCsrfToken(null);
      replaceSessionUser(queryClient, null);
    },
  });
  return queryClient;
}

export function AppProvider({ queryClient, children }: { queryClient: QueryClient; children: ReactNode }) {
  return (
    <QueryClientProvider client={queryClient}>
      <ThemeProvider>{children}</ThemeProvider>
    </QueryClientProvider>
  );
}
