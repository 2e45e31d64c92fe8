import type { QueryClient } from '@tanstack/react-query';
import type { ComponentType } from 'react';
import { createBrowserRouter, Navigate, Outlet, type LoaderFunction, type RouteObject } from 'react-router';
import type { Capability } from '@shared/auth/roles';
import { LoadingLine } from '@/components/ui/spinner';
import { appLayoutLoader, AppLayout } from './routes/app-layout';
import { HomeRedirect } from './routes/home-redirect';
import { NotFoundRoute } from './routes/not-found';
import { RouteError } from './routes/route-error';
import { modelsRoutes } from './routes/models-routes';
import { signInLoader, SignInRoute } from './routes/sign-in';

/** Read by the signed-in layout: a route naming a capability shows "not allowed" to roles without it. */
export type RouteHandle = { capability?: Capability };

/**
 * The route tree. A factory, so the browser and the tests build the same
 * routes around their own query client. Screens load lazily: each becomes its
 * own chunk as it grows.
 */
export function createAppRoutes(queryClient: QueryClient): RouteObject[] {
  const screen = (path: string, capability: Capability, load: () => Promise<{ Component: ComponentType; loader?: LoaderFunction }>): RouteObject => ({
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
        // The address people type for a sign-in page: it goes to ours, not to "Page not found" after signing in.
        { path: '/login', element: <Navigate to="/sign-in" replace /> },
        {
          path: '/accept-invite',
          errorElement: <RouteError />,
          lazy: async () => ({ Component: (await import('./routes/accept-invite')).AcceptInviteRoute }),
        },
        {
          id: 'app',
          loader: appLayoutLoader(queryClient),
          element: <AppLayout />,
          errorElement: <RouteError />,
          children: [
            { index: true, element: <HomeRedirect /> },
            screen('queue', 'queue:read', async () => ({ Component: (await import('./routes/queue')).QueueRoute })),
            screen('cases/:id', 'queue:read', async () => {
              const route = await import('./routes/case-file');
              return { Component: route.CaseFileRoute, loader: route.caseFileLoader(queryClient) };
            }),
            screen('board', 'board:read', async () => {
              const route = await import('./routes/board');
              return { Component: route.BoardRoute, loader: route.boardLoader(queryClient) };
            }),
            {
              path: 'models',
              handle: { capability: 'models:read' } satisfies RouteHandle,
              errorElement: <RouteError />,
              lazy: async () => {
                const route = await import('./routes/models');
                return { Component: route.ModelsRoute, loader: route.modelsLoader(queryClient) };
              },
              children: modelsRoutes(queryClient),
            },
            screen('admin', 'users:manage', async () => {
              const route = await import('./routes/admin');
              return { Component: route.AdminRoute, loader: route.adminLoader(queryClient) };
            }),
            screen('audit', 'audit:read', async () => {
              const route = await import('./routes/audit');
              return { Component: route.AuditRoute, loader: route.auditLoader(queryClient) };
            }),
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
