import { MutationCache, QueryCache, QueryClient } from '@tanstack/react-query';
import { isApiError } from './api-client';

declare module '@tanstack/react-query' {
  interface Register {
    queryMeta: { handlesUnauthorized?: boolean };
    mutationMeta: { handlesUnauthorized?: boolean };
  }
}

const MAX_RETRIES = 2;

export function shouldRetry(failureCount: number, error: unknown): boolean {
  // A 4xx is an answer, not a hiccup: asking again gives the same one.
  if (isApiError(error) && error.isClientError) return false;
  return failureCount < MAX_RETRIES;
}

export type QueryClientOptions = {
  /**
   * Called when any query or mutation gets a 401, i.e. the session ended
   * (idle timeout, signed out elsewhere). Queries and mutations that expect a
   * 401 as an ordinary answer opt out with `meta: { handlesUnauthorized: true }`.
   */
  onUnauthorized?: () => void;
};

export function createQueryClient({ onUnauthorized }: QueryClientOptions = {}): QueryClient {
  const isUnauthorized = (error: unknown) => isApiError(error) && error.status === 401;
  return new QueryClient({
    queryCache: new QueryCache({
      onError: (error, query) => {
        if (isUnauthorized(error) && !query.meta?.handlesUnauthorized) onUnauthorized?.();
      },
    }),
    mutationCache: new MutationCache({
      onError: (error, _variables, _context, mutation) => {
        if (isUnauthorized(error) && !mutation.meta?.handlesUnauthorized) onUnauthorized?.();
      },
    }),
    defaultOptions: {
      queries: {
        // Live data arrives over the socket; polling on every mount would only add load.
        staleTime: 30_000,
        gcTime: 5 * 60_000,
        retry: shouldRetry,
        refetchOnWindowFocus: true,
      },
      mutations: { retry: false },
    },
  });
}
