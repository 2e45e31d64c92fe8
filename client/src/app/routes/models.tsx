import type { QueryClient } from '@tanstack/react-query';
import { Outlet } from 'react-router';
import { getModelsQueryOptions } from '@/features/models/api/get-models';
import { getPromotionsQueryOptions } from '@/features/models/api/get-promotions';
import { getTrainingRunsQueryOptions } from '@/features/models/api/get-training-runs';
import { ModelsLayout } from '@/features/models/components/models-layout';
import { useSessionUser } from '../session';

/** The Models area's frame: what needs attention (requests, runs, drift) and the section tabs. */
export function modelsLoader(queryClient: QueryClient) {
  // Started here, not awaited: the frame and the page's own data load side by side, and a slow list never holds the page.
  return () => {
    void queryClient.prefetchQuery(getModelsQueryOptions());
    void queryClient.prefetchQuery(getPromotionsQueryOptions());
    void queryClient.prefetchQuery(getTrainingRunsQueryOptions());
    return null;
  };
}

export function ModelsRoute() {
  const { role } = useSessionUser();
  return (
    <ModelsLayout role={role}>
      <title>Models · Edgecase</title>
      <Outlet />
    </ModelsLayout>
  );
}
