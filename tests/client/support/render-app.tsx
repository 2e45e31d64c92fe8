import { render } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import { createMemoryRouter, RouterProvider } from 'react-router';
import { AppProvider, createAppQueryClient } from '@/app/provider';
import { createAppRoutes } from '@/app/router';

/** The real route tree and providers, in memory history starting at `path`. */
export function renderApp(path: string) {
  const queryClient = createAppQueryClient();
  const router = createMemoryRouter(createAppRoutes(queryClient), { initialEntries: [path] });
  const user = userEvent.setup();
  const view = render(
    <AppProvider queryClient={queryClient}>
      <RouterProvider router={router} />
    </AppProvider>,
  );
  const location = () => `${router.state.location.pathname}${router.state.location.search}`;
  return { ...view, router, queryClient, user, location };
}
