import { useMutation, useQueryClient } from '@tanstack/react-query';
import { savedViewsSchema, type SavedViews } from '@shared/api/cases';
import { api } from '@/lib/api-client';
import { getSavedViewsQueryOptions } from './get-saved-views';

/** PUT /api/queue/views: replaces this person's saved views and default columns. */
export async function saveSavedViews(views: SavedViews): Promise<SavedViews> {
  const sent = savedViewsSchema.parse(views);
  const answer = savedViewsSchema.safeParse(await api.put<unknown>('/api/queue/views', sent));
  // The server answers with what it stored; an empty answer means it stored what was sent.
  return answer.success ? answer.data : sent;
}

export function useSaveSavedViews() {
  const queryClient = useQueryClient();
  const { queryKey } = getSavedViewsQueryOptions();
  return useMutation({
    mutationFn: saveSavedViews,
    onSuccess: (saved) => queryClient.setQueryData(queryKey, saved),
    onSettled: () => queryClient.invalidateQueries({ queryKey }),
  });
}
