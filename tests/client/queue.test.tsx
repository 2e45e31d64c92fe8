import { act, configure, screen, waitFor, within } from '@testing-library/react';
import { describe, expect, it } from 'vitest';
import type { CaseSummary, QueueAlertEvent } from '@shared/api/cases';
import { caseSummary, queriesTo, queuePage, withQuery } from './support/case-fixtures';
import { currentSocket } from './support/fake-socket';
import { CSRF, signedInRoutes, stubFetch, users } from './support/fetch-stub';
import { renderApp } from './support/render-app';

// These tests load lazy screens and type whole sentences; a busy machine needs more than the default second.
configure({ asyncUtilTimeout: 4000 });

type Routes = Parameters<typeof stubFetch>[0];

/** The queue's own page requests (the deadline counts ask for pageSize=1). */
const listQueries = () => queriesTo('/api/cases').filter((q) => q.get('pageSize') !== '1');
const lastListQuery = () => listQueries().at(-1)!;

function queueRoutes(list: () => CaseSummary[], extra: Routes = {}): Routes {
  return {
    ...signedInRoutes('investigator'),
    'GET /api/cases': withQuery((query) => {
      if (query.get('pageSize') === '1') {
        return { status: 200, body: queuePage([], { total: query.get('dueWithinMinutes') === '0' ? 2 : 5, pageSize: 1 }) };
      }
      const items = list();
      return { status: 200, body: queuePage(items, { total: items.length + 40 }) };
    }),
    'GET /api/queue/views': { status: 200, body: { views: [] } },
    ...extra,
  };
}

const row = (id: number) => document.querySelector<HTMLTableRowElement>(`tr[data-case-id="${id}"]`);
const rowIds = () => [...document.querySelectorAll('tbody tr[data-case-id]')].map((r) => Number(r.getAttribute('data-case-id')));

async function openQueue(path = '/queue') {
  const app = renderApp(path);
  // The first visit loads the Queue's lazy chunk.
  await screen.findByRole('table', {}, { timeout: 5000 });
  await waitFor(() => expect(rowIds().length).toBeGreaterThan(0));
  return app;
}

describe('Queue table', { timeout: 20_000 }, () => {
  it('names the team each case was routed to, and the shared queue for the rest', async () => {
    const cases = [caseSummary(21, { team: { id: 4, name: 'Online desk' } }), caseSummary(22)];
    stubFetch(queueRoutes(() => cases));
    await openQueue();

    expect(screen.getByRole('columnheader', { name: 'Team' })).toBeInTheDocument();
    expect(within(row(21)!).getByText('Online desk')).toHaveAttribute('title', 'Routed to Online desk');
    expect(within(row(22)!).getByText('Shared')).toBeInTheDocument();
    expect(within(row(22)!).queryByText('Online desk')).toBeNull();
    expect(row(21)).toHaveAccessibleName(/team Online desk$/);
  });

  it('renders the server page: score with word and margin, money, card fragment, SLA in words, and the match count', async () => {
    const cases = [
      caseSummary(11, { slaDueAt: '2031-05-06T09:55:00.000Z', priority: 'urgent' }),
      caseSummary(12, { slaDueAt: '2031-05-06T10:20:00.000Z', probability: 0.31, normalizedMargin: -0.2 }),
      caseSummary(13, { assignee: { id: users.investigator.id, displayName: 'Ines Marlow' }, status: 'claimed' }),
    ];
    stubFetch(queueRoutes(() => cases));
    await openQueue();

    expect(rowIds()).toEqual([11, 12, 13]);
    const first = within(row(11)!);
    expect(first.getByText('87.4 %')).toBeInTheDocument();
    expect(first.getByText('very high')).toBeInTheDocument();
    expect(first.getByRole('meter', { name: 'Normalised margin' })).toHaveAttribute('aria-valuenow', '0.42');
    expect(first.getByText('EUR 1,240.11')).toBeInTheDocument();
    expect(first.getByLabelText('Card 491761, ending 1011')).toBeInTheDocument();
    expect(first.getByText('Urgent')).toBeInTheDocument();
    expect(first.getByText('5967')).toBeInTheDocument();
    expect(first.getByText('breached 5 min ago').closest('[data-sla]')).toHaveAttribute('data-sla', 'breached');

    const second = within(row(12)!);
    expect(second.getByText('elevated')).toBeInTheDocument();
    expect(second.getByText(/^urgent, 19 min left$/).closest('[data-sla]')).toHaveAttribute('data-sla', 'due_soon');
    expect(within(row(13)!).getByText('You')).toBeInTheDocument();
    expect(within(row(13)!).getByText(/^in 1 h 59 min$/)).toBeInTheDocument();

    const now = screen.getByRole('region', { name: 'What needs me now?' });
    expect(now).toHaveTextContent('43 cases match this view');
    expect(now).toHaveTextContent('2 open past their SLA');
    expect(now).toHaveTextContent('5 due within 30 min');
    expect(screen.getByRole('navigation', { name: 'Pages' })).toHaveTextContent('1–3 of 43');

    const query = lastListQuery();
    expect(Object.fromEntries(query)).toMatchObject({ view: 'all', sort: 'priority', order: 'desc', page: '1', pageSize: '50' });
  });

  it('sorts on the server: a header click sends sort and order and keeps them in the URL', async () => {
    stubFetch(queueRoutes(() => [caseSummary(1), caseSummary(2)]));
    const { user, location } = await openQueue();

    await user.click(screen.getByRole('button', { name: 'Probability' }));
    await waitFor(() => expect(lastListQuery().get('sort')).toBe('probability'));
    expect(lastListQuery().get('order')).toBe('desc');
    expect(location()).toBe('/queue?sort=probability');
    expect(screen.getByRole('columnheader', { name: 'Probability' })).toHaveAttribute('aria-sort', 'descending');

    await user.click(screen.getByRole('button', { name: 'Probability' }));
    await waitFor(() => expect(lastListQuery().get('order')).toBe('asc'));
    expect(location()).toBe('/queue?sort=probability&order=asc');
  });

  it('puts filters in the query string and back on the first page', async () => {
    stubFetch(queueRoutes(() => [caseSummary(1)]));
    const { user, location } = await openQueue('/queue?page=3');
    expect(lastListQuery().get('page')).toBe('3');

    await user.click(screen.getByLabelText('Status: Any'));
    await user.click(screen.getByRole('checkbox', { name: 'Escalated' }));
    await user.click(screen.getByRole('checkbox', { name: 'Waiting on cardholder' }));
    await waitFor(() => expect(lastListQuery().get('status')).toBe('escalated,waiting_cardholder'));
    expect(lastListQuery().get('page')).toBe('1');

    await user.type(screen.getByLabelText('Min. probability %'), '80{Enter}');
    await waitFor(() => expect(lastListQuery().get('minProbability')).toBe('0.8'));

    await user.type(screen.getByRole('textbox', { name: 'Country' }), 'gb, fr{Enter}');
    await waitFor(() => expect(lastListQuery().get('country')).toBe('GB,FR'));

    await user.type(screen.getByRole('textbox', { name: 'Merchant category' }), '59x{Enter}');
    expect(await screen.findByText('Four-digit codes, separated by commas.')).toBeInTheDocument();
    expect(lastListQuery().get('mcc')).toBeNull();

    await user.keyboard('{Escape}');
    await user.keyboard('/');
    expect(screen.getByRole('searchbox', { name: /Search/ })).toHaveFocus();
    await user.keyboard('1011');
    await waitFor(() => expect(lastListQuery().get('q')).toBe('1011'));

    expect(new URLSearchParams(location().split('?')[1])).toEqual(
      new URLSearchParams('q=1011&status=escalated,waiting_cardholder&country=GB,FR&minProbability=0.8'),
    );
  });

  it('switches views with a, m and u', async () => {
    stubFetch(queueRoutes(() => [caseSummary(1)]));
    const { user, location } = await openQueue();
    await user.keyboard('m');
    await waitFor(() => expect(lastListQuery().get('view')).toBe('mine'));
    expect(screen.getByRole('button', { name: 'Mine', pressed: true })).toBeInTheDocument();
    await user.keyboard('u');
    await waitFor(() => expect(location()).toBe('/queue?view=unassigned'));
    await user.keyboard('a');
    await waitFor(() => expect(location()).toBe('/queue'));
  });

  it('moves with j and k, claims with c once the server agrees, and opens with Enter', async () => {
    let claimed = false;
    const cases = () => [caseSummary(1), caseSummary(2, claimed ? { status: 'claimed', assignee: { id: 1, displayName: 'Ines Marlow' } } : {}), caseSummary(3)];
    const api = stubFetch(
      queueRoutes(cases, {
        'POST /api/cases/2/claim': () => {
          claimed = true;
          return { status: 200, body: { case: cases()[1] } };
        },
        'GET /api/cases/2': { status: 404, body: { error: { code: 'not_found', message: 'No such case' } } },
      }),
    );
    const { user, location } = await openQueue();

    await user.keyboard('j');
    expect(row(1)).toHaveFocus();
    await user.keyboard('jj');
    expect(row(3)).toHaveFocus();
    await user.keyboard('k');
    expect(row(2)).toHaveFocus();
    expect(row(2)).toHaveAttribute('aria-current', 'true');

    expect(within(row(2)!).getByText('Unassigned')).toBeInTheDocument();
    await user.keyboard('c');
    expect(await screen.findByText('You hold case 2 now. Press o to open it.')).toBeInTheDocument();
    expect(within(row(2)!).getByText('You')).toBeInTheDocument();
    const [claim] = api.callsTo('POST', '/api/cases/2/claim');
    expect(claim.headers['x-csrf-token']).toBe(CSRF);

    await user.keyboard('{Enter}');
    await waitFor(() => expect(location()).toBe('/cases/2'));
  });

  it('says who has a case when the claim is refused with 409, and changes nothing', async () => {
    stubFetch(
      queueRoutes(() => [caseSummary(5)], {
        'POST /api/cases/5/claim': {
          status: 409,
          body: { error: { code: 'already_claimed', message: 'This case is claimed.', claimedBy: { id: 8, displayName: 'Noor Vance' } } },
        },
      }),
    );
    const { user } = await openQueue();
    await user.keyboard('jc');
    expect(await screen.findByRole('alert')).toHaveTextContent('Already claimed by Noor Vance (case 5).');
    expect(within(row(5)!).getByText('Unassigned')).toBeInTheDocument();
  });

  it('on queue:alert refetches, marks new rows, and holds arrivals above the focused row behind a counter', async () => {
    let items = [caseSummary(1), caseSummary(2), caseSummary(3)];
    stubFetch(queueRoutes(() => items));
    const { user } = await openQueue();
    act(() => currentSocket().serverConnect());

    await user.keyboard('jj');
    expect(row(2)).toHaveFocus();
    const before = listQueries().length;

    items = [caseSummary(9, { priority: 'urgent' }), caseSummary(1), caseSummary(2), caseSummary(3), caseSummary(4, { priority: 'standard' })];
    const event: QueueAlertEvent = {
      type: 'case.alerted',
      caseId: 9,
      created: true,
      transactionId: 900,
      externalId: 'up-900',
      probability: 0.97,
      status: 'new',
      assigneeId: null,
      teamId: null,
      at: '2031-05-06T10:00:05.000Z',
    };
    act(() => currentSocket().serverEmit('queue:alert', event));

    await waitFor(() => expect(row(4)).not.toBeNull());
    expect(listQueries().length).toBeGreaterThan(before);
    expect(row(4)).toHaveAttribute('data-arrival', 'new');
    expect(within(row(4)!).getByText('new')).toBeInTheDocument();
    // Case 9 sorts above the focused row: it waits, so row 2 keeps its place and its focus.
    expect(row(9)).toBeNull();
    expect(rowIds()).toEqual([1, 2, 3, 4]);
    expect(row(2)).toHaveFocus();
    expect(screen.getByRole('button', { name: /1 new case arrived above — press n to show/ })).toBeInTheDocument();
    expect(screen.getByRole('region', { name: 'What needs me now?' })).toHaveTextContent('1 alert arrived since you opened the Queue');

    await user.keyboard('n');
    expect(rowIds()).toEqual([9, 1, 2, 3, 4]);
    expect(row(9)).toHaveAttribute('data-arrival', 'new');
    expect(row(1)).not.toHaveAttribute('data-arrival');
    expect(row(2)).toHaveFocus();
    expect(screen.queryByRole('button', { name: /arrived above/ })).not.toBeInTheDocument();
  });

  it('resyncs after the live connection comes back', async () => {
    stubFetch(queueRoutes(() => [caseSummary(1)]));
    await openQueue();
    const socket = currentSocket();
    act(() => socket.serverConnect());
    await waitFor(() => expect(screen.getByText('Live')).toBeInTheDocument());
    const before = listQueries().length;
    act(() => socket.transportLost());
    act(() => socket.serverConnect());
    await waitFor(() => expect(listQueries().length).toBeGreaterThan(before));
  });

  it('lists its keys in the help overlay', async () => {
    stubFetch(queueRoutes(() => [caseSummary(1)]));
    const { user } = await openQueue();
    await user.keyboard('?');
    const dialog = await screen.findByRole('dialog', { name: 'Keyboard shortcuts' });
    for (const text of ['Next case', 'Previous case', 'Open the case under the cursor', 'Claim the case under the cursor', 'Show cases that arrived above the cursor', 'View: Mine', 'View: Unassigned', 'View: All cases', 'Search by case id, BIN or last four']) {
      expect(within(dialog).getByText(text)).toBeInTheDocument();
    }
  });
});
