import { screen, waitFor, within } from '@testing-library/react';
import { describe, expect, it } from 'vitest';
import { CSRF, signedOutRoutes, stubFetch, users } from './support/fetch-stub';
import { renderApp } from './support/render-app';

async function fillAndSubmit(user: ReturnType<typeof renderApp>['user'], email: string, password: string) {
  if (email) await user.type(screen.getByLabelText('Email'), email);
  if (password) await user.type(screen.getByLabelText('Password'), password);
  await user.click(screen.getByRole('button', { name: 'Sign in' }));
}

describe('sign-in form', () => {
  it('shows validation messages and sends nothing when the fields are empty or malformed', async () => {
    const api = stubFetch(signedOutRoutes);
    const { user } = renderApp('/sign-in');
    await screen.findByLabelText('Email');

    await user.click(screen.getByRole('button', { name: 'Sign in' }));
    expect(await screen.findByText('Enter your email address.')).toBeInTheDocument();
    expect(screen.getByText('Enter your password.')).toBeInTheDocument();
    expect(screen.getByLabelText('Email')).toHaveAttribute('aria-invalid', 'true');

    await user.type(screen.getByLabelText('Email'), 'not-an-address');
    await user.click(screen.getByRole('button', { name: 'Sign in' }));
    expect(await screen.findByText(/Enter a valid email address/)).toBeInTheDocument();
    expect(api.callsTo('POST', '/api/auth/login')).toHaveLength(0);
  });

  it("shows the server's message on 401", async () => {
    stubFetch({
      ...signedOutRoutes,
      'POST /api/auth/login': {
        status: 401,
        body: { error: { code: 'invalid_credentials', message: 'That email and password do not match an account.' } },
      },
    });
    const { user, location } = renderApp('/sign-in');
    await screen.findByLabelText('Email');
    await fillAndSubmit(user, 'ines@fernhollow.example', 'wrong-password');

    expect(await screen.findByRole('alert')).toHaveTextContent('That email and password do not match an account.');
    expect(location()).toBe('/sign-in');
  });

  it('shows how long to wait on 423 (locked) and 429 (rate limited)', async () => {
    let answer = 423;
    stubFetch({
      ...signedOutRoutes,
      'POST /api/auth/login': () =>
        answer === 423
          ? { status: 423, body: { error: { code: 'account_locked', message: 'Too many failed attempts; the account is locked.', retryAfterSeconds: 900 } } }
          : { status: 429, body: { error: { code: 'rate_limited', message: 'Too many sign-in attempts from here.', retryAfterSeconds: 45 } } },
    });
    const { user } = renderApp('/sign-in');
    await screen.findByLabelText('Email');
    await fillAndSubmit(user, 'ines@fernhollow.example', 'whatever');
    const alert = await screen.findByRole('alert');
    expect(alert).toHaveTextContent('Too many failed attempts; the account is locked.');
    expect(alert).toHaveTextContent('Try again in 15 minutes.');

    answer = 429;
    await user.click(screen.getByRole('button', { name: 'Sign in' }));
    await waitFor(() => expect(screen.getByRole('alert')).toHaveTextContent('Try again in 45 seconds.'));
  });

  it("puts a 400's field messages under the fields", async () => {
    stubFetch({
      ...signedOutRoutes,
      'POST /api/auth/login': {
        status: 400,
        body: { error: { code: 'validation_failed', message: 'Invalid request', fields: [{ path: 'email', message: 'This address is not allowed here.' }] } },
      },
    });
    const { user } = renderApp('/sign-in');
    await screen.findByLabelText('Email');
    await fillAndSubmit(user, 'ines@fernhollow.example', 'secret');
    expect(await screen.findByText('This address is not allowed here.')).toBeInTheDocument();
    expect(screen.getByLabelText('Email')).toHaveAttribute('aria-invalid', 'true');
  });

  it('signs in with the CSRF token and a normalised email, then lands on the role home', async () => {
    const api = stubFetch({
      ...signedOutRoutes,
      'POST /api/auth/login': { status: 200, body: { user: users.data_scientist, csrfToken: 'fresh-token-after-regeneration' } },
    });
    const { user, location } = renderApp('/sign-in');
    await screen.findByLabelText('Email');
    await fillAndSubmit(user, '  Dara@Fernhollow.example ', 'correct horse');

    expect(await screen.findByRole('heading', { level: 1, name: 'Models' })).toBeInTheDocument();
    expect(location()).toBe('/models');
    const [call] = api.callsTo('POST', '/api/auth/login');
    expect(call.body).toEqual({ email: 'dara@fernhollow.example', password: 'correct horse' });
    expect(call.headers['x-csrf-token']).toBe(CSRF);
    expect(screen.getByText('Dara Quill')).toBeInTheDocument();
  });

  it('returns to the page asked for in ?next= when the role may see it, else to the role home', async () => {
    stubFetch({
      ...signedOutRoutes,
      'POST /api/auth/login': { status: 200, body: { user: users.supervisor, csrfToken: 'fresh-token-after-regeneration' } },
    });
    const first = renderApp('/sign-in?next=%2Faudit');
    await screen.findByLabelText('Email');
    await fillAndSubmit(first.user, 'sam@fernhollow.example', 'pw');
    expect(await screen.findByRole('heading', { level: 1, name: 'Audit' })).toBeInTheDocument();
    first.unmount();

    const second = renderApp('/sign-in?next=%2Fadmin');
    await screen.findByLabelText('Email');
    await fillAndSubmit(second.user, 'sam@fernhollow.example', 'pw');
    expect(await screen.findByRole('heading', { level: 1, name: 'Board' })).toBeInTheDocument();
    expect(second.location()).toBe('/board');
  });
});

describe('demo accounts note', () => {
  it('lists the demo accounts and fills the form from one', async () => {
    stubFetch({
      ...signedOutRoutes,
      'GET /api/demo/info': {
        status: 200,
        body: { demo: true, password: 'demo-pass-1', accounts: [{ email: 'ines@fernhollow.example', role: 'investigator' }, { email: 'ada@fernhollow.example', role: 'admin' }] },
      },
    });
    const { user } = renderApp('/sign-in');
    const note = await screen.findByRole('region', { name: 'Demo accounts' });
    expect(within(note).getByText('ada@fernhollow.example')).toBeInTheDocument();
    expect(within(note).getByText('demo-pass-1')).toBeInTheDocument();

    await user.click(within(note).getByRole('button', { name: 'Fill in ada@fernhollow.example' }));
    expect(screen.getByLabelText('Email')).toHaveValue('ada@fernhollow.example');
    expect(screen.getByLabelText('Password')).toHaveValue('demo-pass-1');
  });

  it('shows nothing when the demo endpoint answers 404', async () => {
    const api = stubFetch(signedOutRoutes);
    renderApp('/sign-in');
    await screen.findByLabelText('Email');
    await waitFor(() => expect(api.callsTo('GET', '/api/demo/info')).toHaveLength(1));
    expect(screen.queryByText('Demo accounts')).not.toBeInTheDocument();
  });
});
