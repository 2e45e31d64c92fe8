import { configure, screen, waitFor } from '@testing-library/react';
import { describe, expect, it } from 'vitest';
import { signedOutRoutes, stubFetch } from './support/fetch-stub';
import { renderApp } from './support/render-app';

configure({ asyncUtilTimeout: 5000 });

const TOKEN = 'tok_abcdefghijklmnopqrstuvwxyz0123456789ABCD';

describe('accepting an invitation', { timeout: 30_000 }, () => {
  it('names the account, checks the password rule and the repeat, sets it once and points to sign-in', async () => {
    const api = stubFetch({
      ...signedOutRoutes,
      'POST /api/auth/invite': { status: 200, body: { email: 'noor@fernhollow.example', displayName: 'Noor Adeyemi', role: 'supervisor', expiresAt: '2031-05-09T09:00:00.000Z' } },
      'POST /api/auth/accept-invite': { status: 200, body: { email: 'noor@fernhollow.example' } },
    });
    const { user } = renderApp(`/accept-invite?token=${TOKEN}`);
    expect(await screen.findByText(/Noor Adeyemi, you are joining as Supervisor \(noor@fernhollow\.example\)/)).toBeInTheDocument();
    expect(api.callsTo('POST', '/api/auth/invite')[0].body).toEqual({ token: TOKEN });
    await user.type(screen.getByLabelText('New password'), 'short');
    await user.type(screen.getByLabelText('The same again'), 'short');
    await user.click(screen.getByRole('button', { name: 'Set password' }));
    expect(await screen.findByText('At least 12 characters')).toBeInTheDocument();
    await user.clear(screen.getByLabelText('New password'));
    await user.type(screen.getByLabelText('New password'), 'kettle pine morning');
    await user.clear(screen.getByLabelText('The same again'));
    await user.type(screen.getByLabelText('The same again'), 'kettle pine mornings');
    await user.click(screen.getByRole('button', { name: 'Set password' }));
    expect(await screen.findByText('The two entries differ')).toBeInTheDocument();
    expect(api.callsTo('POST', '/api/auth/accept-invite')).toHaveLength(0);
    await user.clear(screen.getByLabelText('The same again'));
    await user.type(screen.getByLabelText('The same again'), 'kettle pine morning');
    await user.click(screen.getByRole('button', { name: 'Set password' }));
    expect(await screen.findByText('Your password is set. Sign in with noor@fernhollow.example.')).toBeInTheDocument();
    expect(api.callsTo('POST', '/api/auth/accept-invite')[0].body).toEqual({ token: TOKEN, password: 'kettle pine morning' });
    await user.click(screen.getByRole('link', { name: 'Go to sign-in' }));
    await waitFor(() => expect(screen.getByRole('button', { name: 'Sign in' })).toBeInTheDocument());
  });

  it('says plainly when a link was used or has expired', async () => {
    stubFetch({
      ...signedOutRoutes,
      'POST /api/auth/invite': { status: 410, body: { error: { code: 'invite_invalid', message: 'This link has been used or has expired. Ask an admin for a new one.' } } },
    });
    const { location } = renderApp(`/accept-invite?token=${TOKEN}`);
    expect(await screen.findByRole('alert')).toHaveTextContent('This link has been used or has expired.');
    expect(screen.queryByLabelText('New password')).not.toBeInTheDocument();
    expect(location()).toMatch(/^\/accept-invite/);
  });
});
