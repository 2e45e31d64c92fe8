import { act, render, screen, waitFor, within } from '@testing-library/react';
import { createMemoryRouter, RouterProvider } from 'react-router';
import { describe, expect, it } from 'vitest';
import { ROLES, type Role } from '@shared/auth/roles';
import { RouteError } from '@/app/routes/route-error';
import { ApiError } from '@/lib/api-client';
import { CSRF, signedInRoutes, signedOutRoutes, stubFetch } from './support/fetch-stub';
import { renderApp } from './support/render-app';

const EXPECTED_NAV: Record<Role, string[]> = {
  investigator: ['Queue'],
  supervisor: ['Queue', 'Board', 'Models', 'Audit'],
  data_scientist: ['Models', 'Data'],
  admin: ['Admin', 'Audit', 'Data'],
};

const EXPECTED_HOME: Record<Role, [string, string]> = {
  investigator: ['/queue', 'Queue'],
  supervisor: ['/board', 'Board'],
  data_scientist: ['/models', 'Models'],
  admin: ['/admin', 'Admin'],
};

describe('navigation by role', () => {
  it.each(ROLES)('%s sees exactly its screens', async (role) => {
    stubFetch(signedInRoutes(role));
    renderApp('/');
    const nav = await screen.findByRole('navigation', { name: 'Screens' });
    const links = within(nav).getAllByRole('link');
    expect(links).toHaveLength(EXPECTED_NAV[role].length);
    // Accessible names, in order: the key hints beside them are hidden from assistive tech.
    EXPECTED_NAV[role].forEach((name, i) => {
      expect(within(nav).getByRole('link', { name })).toBe(links[i]);
      expect(links[i]).toHaveAttribute('href', `/${name.toLowerCase()}`);
    });
  });

  it.each(ROLES)('"/" sends %s to its home', async (role) => {
    stubFetch(signedInRoutes(role));
    const { location } = renderApp('/');
    const [path, title] = EXPECTED_HOME[role];
    expect(await screen.findByRole('heading', { level: 1, name: title })).toBeInTheDocument();
    expect(location()).toBe(path);
  });
});

describe('protected routes', () => {
  it('sends a visitor without a session to sign-in, remembering the page', async () => {
    stubFetch(signedOutRoutes);
    const { location } = renderApp('/board?filter=mine');
    expect(await screen.findByRole('button', { name: 'Sign in' })).toBeInTheDocument();
    expect(location()).toBe(`/sign-in?next=${encodeURIComponent('/board?filter=mine')}`);
    expect(screen.queryByRole('heading', { name: 'Board' })).not.toBeInTheDocument();
  });

  it('shows "not allowed for your role" for a screen the role may not see', async () => {
    stubFetch(signedInRoutes('investigator'));
    const { location } = renderApp('/admin');
    expect(await screen.findByRole('heading', { name: 'This screen is not allowed for your role' })).toBeInTheDocument();
    expect(screen.queryByRole('heading', { name: 'Admin' })).not.toBeInTheDocument();
    expect(location()).toBe('/admin');
  });

  it('lets a supervisor open Models read-only', async () => {
    stubFetch(signedInRoutes('supervisor'));
    renderApp('/models');
    expect(await screen.findByRole('heading', { level: 1, name: 'Models' })).toBeInTheDocument();
    expect(screen.getByText(/Read-only for your role/)).toBeInTheDocument();
  });

  it('shows a 404 page for an unknown address, inside the shell', async () => {
    stubFetch(signedInRoutes('admin'));
    renderApp('/no-such-screen');
    expect(await screen.findByRole('heading', { name: 'Page not found' })).toBeInTheDocument();
    expect(screen.getByRole('navigation', { name: 'Screens' })).toBeInTheDocument();
  });

  it('the Queue carries the caution about the score', async () => {
    stubFetch(signedInRoutes('investigator'));
    renderApp('/queue');
    const note = await screen.findByRole('complementary', { name: 'About the score' });
    expect(note).toHaveTextContent(
      "The score is evidence, not a verdict. Decisions to block a card or report a customer stay with trained staff under your institution's policy and local law.",
    );
    expect(screen.getByRole('heading', { name: 'What needs me now?' })).toBeInTheDocument();
  });

  it('a 401 from any other call ends the session on screen and asks to sign in again', async () => {
    stubFetch(signedInRoutes('investigator'));
    const { queryClient, location } = renderApp('/queue');
    await screen.findByRole('heading', { level: 1, name: 'Queue' });
    await act(async () => {
      await queryClient
        .fetchQuery({
          queryKey: ['cases'],
          queryFn: () => Promise.reject(new ApiError({ status: 401, code: 'unauthenticated', message: 'Session expired' })),
        })
        .catch(() => undefined);
    });
    expect(await screen.findByRole('button', { name: 'Sign in' })).toBeInTheDocument();
    expect(location()).toBe('/sign-in?next=%2Fqueue');
  });

  it('signing out posts with the CSRF token and lands on a plain sign-in page', async () => {
    let signedIn = true;
    const api = stubFetch({
      ...signedOutRoutes,
      'GET /api/auth/me': () =>
        signedIn ? { status: 200, body: { user: { id: 2, email: 's@x.example', displayName: 'Sam Okafor', role: 'supervisor' } } } : { status: 401 },
      'POST /api/auth/logout': () => {
        signedIn = false;
        return { status: 204 };
      },
    });
    const { user, location, queryClient } = renderApp('/board');
    await screen.findByRole('heading', { level: 1, name: 'Board' });
    queryClient.setQueryData(['cases', 'open'], [{ id: 1 }]);

    await user.click(screen.getByRole('button', { name: 'Sign out' }));
    expect(await screen.findByRole('button', { name: 'Sign in' })).toBeInTheDocument();
    await waitFor(() => expect(location()).toBe('/sign-in'));
    const [call] = api.callsTo('POST', '/api/auth/logout');
    expect(call.headers['x-csrf-token']).toBe(CSRF);
    expect(queryClient.getQueryData(['cases', 'open'])).toBeUndefined();
  });

  it('/login, the address people type, is the sign-in page', async () => {
    stubFetch(signedOutRoutes);
    const { location } = renderApp('/login');
    expect(await screen.findByRole('button', { name: 'Sign in' })).toBeInTheDocument();
    expect(location()).toBe('/sign-in');
  });

  it('/login takes a signed-in person to their home, not to "Page not found"', async () => {
    stubFetch(signedInRoutes('supervisor'));
    const { location } = renderApp('/login');
    expect(await screen.findByRole('heading', { level: 1, name: 'Board' })).toBeInTheDocument();
    expect(location()).toBe('/board');
  });

  it('an already signed-in person opening /sign-in goes to their home', async () => {
    stubFetch(signedInRoutes('admin'));
    const { location } = renderApp('/sign-in');
    expect(await screen.findByRole('heading', { level: 1, name: 'Admin' })).toBeInTheDocument();
    expect(location()).toBe('/admin');
  });
});

describe('route error element', () => {
  it('shows what failed instead of a blank screen', async () => {
    const router = createMemoryRouter(
      [
        {
          path: '/',
          loader: () => {
            throw new ApiError({ status: 500, code: 'internal', message: 'The database did not answer.' });
          },
          element: <p>never</p>,
          errorElement: <RouteError />,
          hydrateFallbackElement: <p>loading</p>,
        },
      ],
      { initialEntries: ['/'] },
    );
    render(<RouterProvider router={router} />);
    const alert = await screen.findByRole('alert');
    expect(alert).toHaveTextContent('The page could not load');
    expect(alert).toHaveTextContent('The database did not answer.');
    expect(within(alert).getByRole('button', { name: 'Reload' })).toBeInTheDocument();
  });
});
