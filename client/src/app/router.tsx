import type { QueryClient } from '@tanstack/react-query';
import type { ComponentType } from 'react';
import { createBrowserRouter, Outlet, type RouteObject } from 'react-router';
import type { Capability } from '@shared/auth/roles';
import { LoadingLine } from '@/components/ui/spinner';
import { appLayoutLoader, AppLayout } from './routes/app-layout';
import { HomeRedirect } from './routes/home-redirect';
import { NotFoundRoute } from './routes/not-found';
import { RouteError } from './routes/route-error';
import { signInLoader, SignInRoute } from './routes/sign-in';

/** Read by the signed-in layout: a route naming a capability shows "not allowed" to roles without it. */
export type RouteHandle = { capability?: Capability };

/**
 * The route tree. A factory, so the browser and the tests build the same
 * routes around their own query client. Screens load lazily: each becomes its
 * own chunk as it grows.
 */
export function createAppRoutes(queryClient: QueryClient): RouteObject[] {
  const screen = (path: string, capability: Capability, load: () => Promise<{ Component: ComponentType }>): RouteObject => ({
    path,
    handle: { capability } satisfies RouteHandle,
    errorElement: <RouteError />,
    lazy: load,
  });

  return [
    {
      id: 'root',
      element: <Outlet />,
      errorElement: <RouteError />,
      hydrateFallbackElement: <LoadingLine className="p-6" />,
      children: [
        { path: '/sign-in', loader: signInLoader(queryClient), element: <SignInRoute />, errorElement: <RouteError /> },
        {
          id: 'app',
          loader: appLayoutLoader(queryClient),
          element: <AppLayout />,
          errorElement: <RouteError />,
          children: [
            { index: true, element: <HomeRedirect /> },
            screen('queue', 'queue:read', async () => ({ Component: (await import('./routes/queue')).QueueRoute })),
            screen('board', 'board:read', async () => ({ Component: (await import('./routes/board')).BoardRoute })),
            screen('models', 'models:read', async () => ({ Component: (await import('./routes/models')).ModelsRoute })),
            screen('admin', 'users:manage', async () => ({ Component: (await import('./routes/admin')).AdminRoute })),
            screen('audit', 'audit:read', async () => ({ Component: (await import('./routes/audit')).AuditRoute })),
            screen('data', 'data:backfill', async () => ({ Component: (await import('./routes/data')).DataRoute })),
            { path: '*', element: <NotFoundRoute />, errorElement: <RouteError /> },
          ],
        },
      ],
    },
  ];
}

export function createAppRouter(queryClient: QueryClient) {
  return createBrowserRouter(createAppRoutes(queryClient));
}
