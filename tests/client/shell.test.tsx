import { act, fireEvent, screen, waitFor, within } from '@testing-library/react';
import { describe, expect, it } from 'vitest';
import { THEME_STORAGE_KEY } from '@/lib/theme';
import { currentSocket, fakeSockets } from './support/fake-socket';
import { signedInRoutes, stubFetch } from './support/fetch-stub';
import { renderApp } from './support/render-app';

describe('keyboard shortcuts', () => {
  it('g then a letter goes to a screen the role may open, and only those', async () => {
    stubFetch(signedInRoutes('supervisor'));
    const { user, location } = renderApp('/board');
    await screen.findByRole('heading', { level: 1, name: 'Board' });

    await user.keyboard('gq');
    expect(await screen.findByRole('heading', { level: 1, name: 'Queue' })).toBeInTheDocument();
    expect(location()).toBe('/queue');

    await user.keyboard('gu');
    expect(await screen.findByRole('heading', { level: 1, name: 'Audit' })).toBeInTheDocument();

    // Admin is not a supervisor's screen: its shortcut is not bound.
    await user.keyboard('ga');
    expect(location()).toBe('/audit');

    // A lone q (no g first) does nothing.
    await user.keyboard('q');
    expect(location()).toBe('/audit');
  });

  it('? opens a help overlay listing the shortcuts that exist for the role; focus stays inside; Esc closes it and gives focus back', async () => {
    stubFetch(signedInRoutes('admin'));
    const { user } = renderApp('/admin');
    await screen.findByRole('heading', { level: 1, name: 'Admin' });
    const opener = screen.getByRole('button', { name: /Shortcuts/ });
    opener.focus();

    await user.keyboard('?');
    const dialog = await screen.findByRole('dialog', { name: 'Keyboard shortcuts' });
    const close = within(dialog).getByRole('button', { name: /Close/ });
    expect(close).toHaveFocus();
    // Its one button is both ends of the loop: Tab and Shift+Tab stay on it.
    await user.tab();
    expect(close).toHaveFocus();
    await user.tab({ shift: true });
    expect(close).toHaveFocus();
    expect(within(dialog).getByText('Go to Admin')).toBeInTheDocument();
    expect(within(dialog).getByText('Go to Audit')).toBeInTheDocument();
    expect(within(dialog).queryByText('Go to Queue')).not.toBeInTheDocument();
    expect(within(dialog).getByText('Show or hide this list of shortcuts')).toBeInTheDocument();
    expect(within(dialog).getByText('Close this list')).toBeInTheDocument();
    expect(within(dialog).getByText('g then u')).toBeInTheDocument();

    await user.keyboard('{Escape}');
    await waitFor(() => expect(screen.queryByRole('dialog')).not.toBeInTheDocument());
    expect(opener).toHaveFocus();
  });

  it('keys typed into a field are text, not shortcuts', async () => {
    stubFetch(signedInRoutes('supervisor'));
    const { user, location } = renderApp('/board');
    await screen.findByRole('heading', { level: 1, name: 'Board' });
    const field = document.createElement('input');
    document.body.append(field);
    field.focus();
    await user.keyboard('gq?');
    expect(field).toHaveValue('gq?');
    expect(location()).toBe('/board');
    expect(screen.queryByRole('dialog')).not.toBeInTheDocument();
    field.remove();
  });
});

describe('theme toggle', () => {
  it('applies the chosen theme to <html> and remembers it', async () => {
    stubFetch(signedInRoutes('investigator'));
    const { user } = renderApp('/queue');
    await screen.findByRole('heading', { level: 1, name: 'Queue' });
    const group = screen.getByRole('group', { name: 'Theme' });
    expect(within(group).getByRole('radio', { name: 'System' })).toBeChecked();
    expect(document.documentElement).toHaveClass('light');

    await user.click(within(group).getByRole('radio', { name: 'Dark' }));
    expect(document.documentElement).toHaveClass('dark');
    expect(document.documentElement).not.toHaveClass('light');
    expect(window.localStorage.getItem(THEME_STORAGE_KEY)).toBe('dark');

    await user.click(within(group).getByRole('radio', { name: 'Light' }));
    expect(document.documentElement).toHaveClass('light');
    expect(window.localStorage.getItem(THEME_STORAGE_KEY)).toBe('light');
  });
});

describe('live connection', () => {
  it('connects with credentials after sign-in and says its state in words', async () => {
    stubFetch(signedInRoutes('investigator'));
    renderApp('/queue');
    await screen.findByRole('heading', { level: 1, name: 'Queue' });
    const socket = currentSocket();
    expect(socket.options).toEqual({ withCredentials: true });
    expect(screen.getByText('Connecting…')).toBeInTheDocument();

    act(() => socket.serverConnect());
    expect(screen.getByText('Live')).toBeInTheDocument();
    act(() => socket.transportLost());
    expect(screen.getByText('Reconnecting…')).toBeInTheDocument();
    act(() => socket.serverConnect());
    act(() => socket.serverDisconnect());
    expect(screen.getByText('Offline')).toBeInTheDocument();
  });

  it('opens no socket on the sign-in page', async () => {
    stubFetch({ ...signedInRoutes('investigator'), 'GET /api/auth/me': { status: 401 }, 'GET /api/demo/info': { status: 404 } });
    renderApp('/sign-in');
    await screen.findByRole('button', { name: 'Sign in' });
    expect(fakeSockets).toHaveLength(0);
  });

  it('on session:ended clears the cached data and goes to sign-in', async () => {
    let signedIn = true;
    stubFetch({
      ...signedInRoutes('investigator'),
      'GET /api/auth/me': () =>
        signedIn
          ? { status: 200, body: { user: { id: 1, email: 'i@x.example', displayName: 'Ines Marlow', role: 'investigator' } } }
          : { status: 401 },
      'GET /api/demo/info': { status: 404 },
    });
    const { queryClient, location } = renderApp('/queue');
    await screen.findByRole('heading', { level: 1, name: 'Queue' });
    queryClient.setQueryData(['cases', 'open'], [{ id: 7 }]);
    const socket = currentSocket();
    act(() => socket.serverConnect());

    signedIn = false;
    act(() => socket.serverEmit('session:ended', { reason: 'signed_out_elsewhere' }));

    expect(await screen.findByRole('button', { name: 'Sign in' })).toBeInTheDocument();
    expect(location()).toBe('/sign-in?next=%2Fqueue');
    expect(queryClient.getQueryData(['cases', 'open'])).toBeUndefined();
    expect(socket.disconnectCalls).toBeGreaterThan(0);
  });

  it('goes offline when the browser does', async () => {
    stubFetch(signedInRoutes('investigator'));
    renderApp('/queue');
    await screen.findByRole('heading', { level: 1, name: 'Queue' });
    act(() => currentSocket().serverConnect());
    fireEvent(window, new Event('offline'));
    expect(screen.getByText('Offline')).toBeInTheDocument();
  });
});
