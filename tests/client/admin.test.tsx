import { configure, screen, waitFor, within } from '@testing-library/react';
import { describe, expect, it } from 'vitest';
import type { AdminApiKey, AdminUser, DemoFeedState } from '@shared/api/admin';
import { signedInRoutes, stubFetch, users } from './support/fetch-stub';
import { renderApp } from './support/render-app';

configure({ asyncUtilTimeout: 5000 });

type Routes = Parameters<typeof stubFetch>[0];

const T = '2031-05-06T09:00:00.000Z';
function person(id: number, over: Partial<AdminUser> = {}): AdminUser {
  return { id, email: `p${id}@fernhollow.example`, displayName: `Person ${id}`, role: 'investigator', status: 'active', lockedUntil: null, failedLoginCount: 0, lastLoginAt: T, createdAt: T, inviteExpiresAt: null, ...over };
}

const me = { ...person(users.admin.id, { displayName: users.admin.displayName, email: users.admin.email, role: 'admin' }) };
const people = () => [
  me,
  person(11, { displayName: 'Lena Park' }),
  person(12, { displayName: 'Omar Reyes', lockedUntil: '2031-05-06T09:15:00.000Z', failedLoginCount: 6 }),
  person(13, { displayName: 'Nia Cole', status: 'invited', lastLoginAt: null, inviteExpiresAt: '2031-05-09T09:00:00.000Z' }),
];
const key = (id: number, over: Partial<AdminApiKey> = {}): AdminApiKey => ({ id, name: `System ${id}`, keyPrefix: 'ek_abcde', scopes: ['transactions:write'], createdAt: T, lastUsedAt: null, revokedAt: null, ...over });

function adminRoutes(extra: Routes = {}): Routes {
  return {
    ...signedInRoutes('admin'),
    'GET /api/admin/users': () => ({ status: 200, body: { users: people() } }),
    'GET /api/admin/api-keys': { status: 200, body: { apiKeys: [key(1, { lastUsedAt: T }), key(2)] } },
    // Outside the local demo the feed endpoint does not exist.
    'GET /api/demo/feed': { status: 404, body: { error: { code: 'not_found', message: 'Not found' } } },
    ...extra,
  };
}

async function openAdmin() {
  const app = renderApp('/admin');
  await screen.findByRole('heading', { level: 1, name: 'Admin' });
  await screen.findByRole('table', { name: 'Staff accounts' });
  return app;
}

describe('Admin: people', { timeout: 30_000 }, () => {
  it('says who is locked out, which invitations wait and which keys were never used', async () => {
    stubFetch(adminRoutes());
    await openAdmin();
    const now = screen.getByRole('region', { name: 'What needs me now?' });
    await waitFor(() => expect(now).toHaveTextContent('1 locked out: Omar Reyes'));
    expect(now).toHaveTextContent('1 invitation not yet accepted');
    expect(now).toHaveTextContent('1 API key never used');
  });

  it('invites by e-mail with the form’s own checks, then posts the invitation', async () => {
    const api = stubFetch(adminRoutes({ 'POST /api/admin/users': { status: 201, body: { user: { id: 20, email: 'new@fernhollow.example' } } } }));
    const { user } = await openAdmin();
    const form = screen.getByRole('form', { name: 'Invite someone' });
    await user.type(within(form).getByRole('textbox', { name: 'E-mail' }), 'not-an-address');
    await user.click(within(form).getByRole('button', { name: 'Send invitation' }));
    expect(await within(form).findByText('Enter an e-mail address')).toBeInTheDocument();
    expect(api.callsTo('POST', '/api/admin/users')).toHaveLength(0);
    await user.clear(within(form).getByRole('textbox', { name: 'E-mail' }));
    await user.type(within(form).getByRole('textbox', { name: 'E-mail' }), 'New@Fernhollow.example');
    await user.type(within(form).getByRole('textbox', { name: 'Name' }), 'Noor Adeyemi');
    await user.selectOptions(within(form).getByRole('combobox', { name: 'Role' }), 'supervisor');
    await user.click(within(form).getByRole('button', { name: 'Send invitation' }));
    expect(await within(form).findByText('Invitation sent to new@fernhollow.example.')).toBeInTheDocument();
    expect(api.callsTo('POST', '/api/admin/users')[0].body).toEqual({ email: 'new@fernhollow.example', displayName: 'Noor Adeyemi', role: 'supervisor' });
  });

  it('deactivates only after a confirmation that says sessions end now; never offers it for oneself', async () => {
    const api = stubFetch(adminRoutes({ 'POST /api/admin/users/11/deactivate': { status: 200, body: { openCasesHeld: 2 } } }));
    const { user } = await openAdmin();
    const table = screen.getByRole('table', { name: 'Staff accounts' });
    expect(within(within(table).getByRole('row', { name: /Ada Brook/ })).queryByRole('button', { name: /Deactivate/ })).not.toBeInTheDocument();
    expect(within(table).getByRole('combobox', { name: 'Role of Ada Brook' })).toBeDisabled();
    await user.click(within(table).getByRole('button', { name: 'Deactivate Lena Park' }));
    const dialog = await screen.findByRole('dialog', { name: 'Deactivate Lena Park?' });
    expect(dialog).toHaveTextContent('Every session they have ends now');
    expect(api.callsTo('POST', '/api/admin/users/11/deactivate')).toHaveLength(0);
    await user.click(within(dialog).getByRole('button', { name: 'Deactivate' }));
    await waitFor(() => expect(api.callsTo('POST', '/api/admin/users/11/deactivate')).toHaveLength(1));
    await waitFor(() => expect(screen.queryByRole('dialog')).not.toBeInTheDocument());
  });

  it('changes a role after confirming, and lifts a lock-out', async () => {
    const api = stubFetch(adminRoutes({ 'PATCH /api/admin/users/11': { status: 204 }, 'POST /api/admin/users/12/unlock': { status: 204 } }));
    const { user } = await openAdmin();
    const table = screen.getByRole('table', { name: 'Staff accounts' });
    await user.selectOptions(within(table).getByRole('combobox', { name: 'Role of Lena Park' }), 'supervisor');
    const dialog = await screen.findByRole('dialog', { name: 'Make Lena Park Supervisor?' });
    await user.click(within(dialog).getByRole('button', { name: 'Change role' }));
    await waitFor(() => expect(api.callsTo('PATCH', '/api/admin/users/11')).toHaveLength(1));
    expect(api.callsTo('PATCH', '/api/admin/users/11')[0].body).toEqual({ role: 'supervisor' });
    expect(within(table).getByRole('row', { name: /Omar Reyes/ })).toHaveTextContent(/Locked until/);
    await user.click(within(table).getByRole('button', { name: 'Unlock Omar Reyes' }));
    await waitFor(() => expect(api.callsTo('POST', '/api/admin/users/12/unlock')).toHaveLength(1));
  });
});

describe('Admin: API keys', { timeout: 30_000 }, () => {
  it('shows a new key once, in a dialog, and forgets it when the dialog closes', async () => {
    const plain = 'ek_0123456789abcdefghijklmnopqrstuvwxyzABCDEFG';
    const api = stubFetch(adminRoutes({ 'POST /api/admin/api-keys': { status: 201, body: { key: plain, apiKey: key(3, { name: 'Card processor' }) } } }));
    const { user, queryClient } = await openAdmin();
    const section = screen.getByRole('region', { name: 'API keys for upstream systems' });
    await user.type(within(section).getByRole('textbox', { name: 'Name of the system' }), 'Card processor');
    await user.click(within(section).getByRole('checkbox', { name: 'Read transaction results' }));
    await user.click(within(section).getByRole('button', { name: 'Create key' }));
    const dialog = await screen.findByRole('dialog', { name: 'Key for Card processor' });
    expect(within(dialog).getByRole('textbox', { name: 'The new API key' })).toHaveValue(plain);
    expect(dialog).toHaveTextContent('this is the only time it is shown');
    expect(api.callsTo('POST', '/api/admin/api-keys')[0].body).toEqual({ name: 'Card processor', scopes: ['transactions:write'] });
    await user.click(within(dialog).getByRole('button', { name: 'I have stored it' }));
    expect(screen.queryByRole('dialog')).not.toBeInTheDocument();
    expect(screen.queryByDisplayValue(plain)).not.toBeInTheDocument();
    expect(JSON.stringify(queryClient.getQueryCache().getAll().map((q) => q.state.data))).not.toContain(plain);
  });

  it('revokes a key after saying what it does', async () => {
    let revoked = false;
    const keys = () => [key(1), key(2, { revokedAt: revoked ? T : null })];
    const api = stubFetch(
      adminRoutes({
        'GET /api/admin/api-keys': () => ({ status: 200, body: { apiKeys: keys() } }),
        'POST /api/admin/api-keys/2/revoke': () => {
          revoked = true;
          return { status: 200, body: { apiKeys: keys() } };
        },
      }),
    );
    const { user } = await openAdmin();
    await user.click(await screen.findByRole('button', { name: 'Revoke System 2' }));
    const dialog = await screen.findByRole('dialog', { name: 'Revoke the key of System 2?' });
    expect(dialog).toHaveTextContent('refused from its next request');
    await user.click(within(dialog).getByRole('button', { name: 'Revoke' }));
    await waitFor(() => expect(api.callsTo('POST', '/api/admin/api-keys/2/revoke')).toHaveLength(1));
    expect(await screen.findByText(/^Revoked/)).toBeInTheDocument();
  });
});

describe('Admin: demo feed', { timeout: 30_000 }, () => {
  const ago = (ms: number) => new Date(Date.now() - ms).toISOString();
  const feed = (over: Partial<DemoFeedState> = {}): DemoFeedState => ({
    requested: { paused: null, rate: null },
    reported: { paused: false, rate: 5, at: ago(2000) },
    totals: { sent: 12_345, accepted: 12_300, duplicates: 40, rejected: 5, retries: 3 },
    lastError: { message: 'HTTP 503 unavailable', at: ago(60_000) },
    ...over,
  });

  it('is absent outside the demo', async () => {
    stubFetch(adminRoutes());
    await openAdmin();
    await screen.findByRole('table', { name: 'API keys' });
    expect(screen.queryByRole('heading', { name: 'Demo transaction feed' })).not.toBeInTheDocument();
  });

  it('shows the pace, the totals and the last problem, and pauses the feed', async () => {
    const api = stubFetch(
      adminRoutes({
        'GET /api/demo/feed': { status: 200, body: { feed: feed() } },
        'PUT /api/demo/feed': (r) => ({ status: 200, body: { feed: feed({ requested: { paused: (r.body as { paused: boolean }).paused, rate: null } }) } }),
      }),
    );
    const { user } = await openAdmin();
    const state = await screen.findByRole('status', { name: 'Feed state' });
    expect(state).toHaveTextContent(/Running at 5 a second \(reported \d s ago\)/);
    const totals = screen.getByLabelText('Feed totals since it started');
    expect(totals).toHaveTextContent('sent12,345');
    expect(totals).toHaveTextContent('duplicates40');
    expect(screen.getByText('HTTP 503 unavailable')).toBeInTheDocument();
    await user.click(screen.getByRole('button', { name: 'Pause the feed' }));
    await waitFor(() => expect(api.callsTo('PUT', '/api/demo/feed')).toHaveLength(1));
    expect(api.callsTo('PUT', '/api/demo/feed')[0].body).toEqual({ paused: true });
    // Asked, not yet picked up: the feed still reports running.
    expect(await screen.findByText(/reaches the feed within a few seconds/)).toBeInTheDocument();
    expect(screen.getByRole('button', { name: 'Resume the feed' })).toBeInTheDocument();
  });

  it('refuses a pace out of range before sending, then sends one in range', async () => {
    const api = stubFetch(
      adminRoutes({
        'GET /api/demo/feed': { status: 200, body: { feed: feed() } },
        'PUT /api/demo/feed': { status: 200, body: { feed: feed({ requested: { paused: null, rate: 12.5 } }) } },
      }),
    );
    const { user } = await openAdmin();
    const form = await screen.findByRole('form', { name: 'Feed pace' });
    const input = within(form).getByRole('spinbutton', { name: 'Transactions a second' });
    await user.type(input, '5000');
    expect(within(form).getByText('Between 0.1 and 1,000')).toBeInTheDocument();
    expect(within(form).getByRole('button', { name: 'Set pace' })).toBeDisabled();
    await user.clear(input);
    await user.type(input, '12.5');
    await user.click(within(form).getByRole('button', { name: 'Set pace' }));
    await waitFor(() => expect(api.callsTo('PUT', '/api/demo/feed')).toHaveLength(1));
    expect(api.callsTo('PUT', '/api/demo/feed')[0].body).toEqual({ rate: 12.5 });
  });

  it('says when the feed has stopped reporting', async () => {
    stubFetch(adminRoutes({ 'GET /api/demo/feed': { status: 200, body: { feed: feed({ reported: { paused: false, rate: 5, at: ago(120_000) }, lastError: null }) } } }));
    await openAdmin();
    const state = await screen.findByRole('status', { name: 'Feed state' });
    expect(state).toHaveTextContent(/no report for 2 min, so the feed process is probably not running/);
  });
});
