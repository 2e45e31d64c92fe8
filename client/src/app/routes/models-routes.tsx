import type { QueryClient } from '@tanstack/react-query';
import type { RouteObject } from 'react-router';
import { RouteError } from './route-error';

/**
 * The sections of the Models screen, each its own lazily loaded page whose
 * loader prefetches with the same query options the page reads.
 */
export function modelsRoutes(queryClient: QueryClient): RouteObject[] {
  const page = (path: string | null, pick: (m: typeof import('./models-pages')) => Pick<RouteObject, 'Component' | 'loader'>): RouteObject => ({
    ...(path === null ? { index: true } : { path }),
    errorElement: <RouteError />,
    lazy: async () => pick(await import('./models-pages')),
  }) as RouteObject;
  return [
    page(null, (m) => ({ Component: m.OverviewPage, loader: m.overviewLoader(queryClient) })),
    page('versions', (m) => ({ Component: m.VersionsPage })),
    page('versions/:id', (m) => ({ Component: m.VersionPage, loader: m.versionLoader(queryClient) })),
    page('versions/:id/card', (m) => ({ Component: m.ModelCardPage, loader: m.versionLoader(queryClient) })),
    page('compare', (m) => ({ Component: m.ComparePage })),
    page('training', (m) => ({ Component: m.TrainingPage, loader: m.trainingLoader(queryClient) })),
    page('drift', (m) => ({ Component: m.DriftPage })),
    page('labels', (m) => ({ Component: m.LabelsPage, loader: m.labelsLoader(queryClient) })),
  ];
}
