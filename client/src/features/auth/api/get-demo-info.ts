import { queryOptions, useQuery } from '@tanstack/react-query';
import { z } from 'zod';
import { ROLES } from '@shared/auth/roles';
import { api, isApiError } from '@/lib/api-client';

const demoInfoSchema = z.object({
  demo: z.literal(true),
  accounts: z.array(z.object({ email: z.string(), role: z.enum(ROLES) })),
  password: z.string(),
});
export type DemoInfo = z.infer<typeof demoInfoSchema>;

/** The local demo's accounts; null outside the demo, where the endpoint does not exist. */
export async function getDemoInfo(signal?: AbortSignal): Promise<DemoInfo | null> {
  try {
    return await api.get('/api/demo/info', { schema: demoInfoSchema, signal });
  } catch (error) {
    if (isApiError(error) && error.status === 404) return null;
    throw error;
  }
}

export function demoInfoQueryOptions() {
  return queryOptions({
    queryKey: ['auth', 'demo-info'] as const,
    queryFn: ({ signal }) => getDemoInfo(signal),
    staleTime: Infinity,
    retry: false,
  });
}

export function useDemoInfo() {
  return useQuery(demoInfoQueryOptions());
}
