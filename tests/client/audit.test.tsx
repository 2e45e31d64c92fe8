import { configure, screen, waitFor, within } from '@testing-library/react';
import { describe, expect, it } from 'vitest';
import type { AuditItem } from '@shared/api/audit';
import { queriesTo } from './support/case-fixtures';
import { signedInRoutes, stubFetch } from './support/fetch-stub';
import { renderApp } from './support/render-app';

configure({ asyncUtilTimeout: 5000 });

type Routes = Parameters<typeof stubFetch>[0];

const item = (id: number, over: Partial<AuditItem> = {}): AuditItem => ({
  id,
  occurredAt: '2031-05-06T09:00:00.000Z',
  actorType: 'user',
  actorId: '2',
  actorLabel: 'sam@fernhollow.example',
  action: 'case.reassign',
  targetType: 'case',
  targetId: String(100 + id),
  outcome: 'success',
  ip: '127.0.0.1',
  details: { from: 1, to: 5 },
  ...over,
});

function auditRoutes(extra: Routes = {}): Routes {
  return {
    ...signedInRoutes('supervisor'),
    'GET /api/audit': { status: 200, body: { items: [item(3), item(2, { outcome: 'denied', action: 'case.approval_approved' })], total: 120, page: 1, pageSize: 50 } },
    'GET /api/audit/facets': { status: 200, body: { actions: ['case.reassign', 'settings.threshold'], people: [{ id: 2, label: 'Sam Okafor (sam@fernhollow.example)' }], targetTypes: ['case', 'settings'] } },
    ...extra,
  };
}

describe('Audit', { timeout: 30_000 }, () => {
  it('filters by person, action family and record, keeps the filters in the address, and exports the same slice', async () => {
    stubFetch(auditRoutes());
    const { user, location } = renderApp('/audit');
    await screen.findByRole('heading', { level: 1, name: 'Audit' });
    const table = await screen.findByRole('table', { name: 'Audit entries, newest first' });
    expect(within(table).getAllByRole('row')).toHaveLength(3);
    expect(within(table).getByText('denied')).toBeInTheDocument();
    expect(screen.getByText(/120 entries match/)).toBeInTheDocument();

    const form = screen.getByRole('form', { name: 'Filter the audit log' });
    await waitFor(() => expect(within(form).getByRole('option', { name: /Sam Okafor/ })).toBeInTheDocument());
    await user.selectOptions(within(form).getByRole('combobox', { name: 'Person' }), '2');
    await user.selectOptions(within(form).getByRole('combobox', { name: 'Action' }), 'case.');
    await user.type(within(form).getByRole('textbox', { name: 'Record id' }), '103');
    await user.click(within(form).getByRole('button', { name: 'Apply filters' }));
    await waitFor(() => expect(location()).toBe('/audit?actorId=2&action=case.&targetId=103'));
    await waitFor(() => {
      const q = queriesTo('/api/audit').at(-1)!;
      expect(Object.fromEntries(q)).toEqual({ actorId: '2', action: 'case.', targetId: '103' });
    });
    await waitFor(() =>
      expect(screen.getByRole('link', { name: 'Export these entries as CSV' })).toHaveAttribute('href', '/api/audit/export.csv?actorId=2&action=case.&targetId=103'),
    );
  });

  it('pages through older entries', async () => {
    stubFetch(auditRoutes());
    const { user, location } = renderApp('/audit?action=case.');
    const pages = await screen.findByRole('navigation', { name: 'Audit pages' });
    expect(pages).toHaveTextContent('Page 1 of 3');
    await user.click(within(pages).getByRole('button', { name: 'Older' }));
    await waitFor(() => expect(location()).toBe('/audit?action=case.&page=2'));
    await waitFor(() => expect(queriesTo('/api/audit').at(-1)!.get('page')).toBe('2'));
  });

  it('verifies the chain and names the first row that does not match', async () => {
    let ok = true;
    const api = stubFetch(
      auditRoutes({
        'POST /api/audit/verify': () => ({
          status: 200,
          body: ok ? { ok: true, checked: 4211, verifiedAt: '2031-05-06T10:00:00.000Z' } : { ok: false, checked: 40, firstBadId: 41, reason: 'row content does not match its hash', verifiedAt: '2031-05-06T10:01:00.000Z' },
        }),
      }),
    );
    const { user } = renderApp('/audit');
    await user.click(await screen.findByRole('button', { name: 'Verify chain' }));
    expect(await screen.findByText(/Intact: all 4,211 rows match their hashes/)).toBeInTheDocument();
    ok = false;
    await user.click(screen.getByRole('button', { name: 'Verify chain' }));
    expect(await screen.findByText(/Broken at row #41: row content does not match its hash/)).toBeInTheDocument();
    expect(api.callsTo('POST', '/api/audit/verify')).toHaveLength(2);
  });

  it('is open to admins too', async () => {
    stubFetch({ ...auditRoutes(), ...signedInRoutes('admin') });
    renderApp('/audit');
    expect(await screen.findByRole('heading', { level: 1, name: 'Audit' })).toBeInTheDocument();
  });
});
