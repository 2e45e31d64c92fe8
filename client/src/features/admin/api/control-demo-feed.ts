import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { DemoFeedControl, DemoFeedState } from '@shared/api/admin';
import { api } from '@/lib/api-client';
import { demoFeedQueryOptions } from './get-demo-feed';

/** PUT /api/demo/feed: the feed reads the change within a couple of seconds. Audited. */
export async function controlDemoFeed(body: DemoFeedControl): Promise<DemoFeedState> {
  const { feed } = await api.put<{ feed: DemoFeedState }>('/api/demo/feed', body);
  return feed;
}

export function useControlDemoFeed() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: controlDemoFeed,
    onSuccess: (feed) => queryClient.setQueryData(demoFeedQueryOptions().queryKey, feed),
  });
}
