import { act, configure, screen, waitFor, within } from '@testing-library/react';
import { describe, expect, it } from 'vitest';
import type { CaseApproval } from '@shared/api/supervision';
import { approvalFixture, boardFixture, curveFixture, settingsFixture } from './support/board-fixtures';
import { caseSummary, queuePage } from './support/case-fixtures';
import { currentSocket } from './support/fake-socket';
import { CSRF, signedInRoutes, stubFetch, users } from './support/fetch-stub';
import { renderApp } from './support/render-app';

// Lazy screens and charts load on a busy machine: more than the default second.
configure({ asyncUtilTimeout: 5000 });

type Routes = Parameters<typeof stubFetch>[0];

function boardRoutes(extra: Routes = {}, approvals: () => CaseApproval[] = () => []): Routes {
  return {
    ...signedInRoutes('supervisor'),
    'GET /api/board': { status: 200, body: boardFixture() },
    'GET /api/approvals': () => ({ status: 200, body: { items: approvals() } }),
    'GET /api/settings/supervision': { status: 200, body: settingsFixture() },
    'GET /api/cases': {
      status: 200,
      body: queuePage([caseSummary(41), caseSummary(42, { assignee: { id: 1, displayName: 'Ines Marlow' }, status: 'claimed' }), caseSummary(43)], { total: 3 }),
    },
    ...extra,
  };
}

async function openBoard(path = '/board') {
  const app = renderApp(path);
  await screen.findByRole('heading', { level: 1, name: 'Board' });
  return app;
}

describe('Board: team', { timeout: 30_000 }, () => {
  it('shows what needs the supervisor now and each person’s workload, breaches in words', async () => {
    stubFetch(boardRoutes({}, () => [approvalFixture(1, 1)]));
    await openBoard();
    const now = screen.getByRole('region', { name: 'What needs me now?' });
    await waitFor(() => expect(now).toHaveTextContent('3 open past their SLA (2 unassigned)'));
    expect(now).toHaveTextContent('1 decision waits for approval');
    expect(now).toHaveTextContent('6 unassigned of 11 open');
    const team = await screen.findByRole('table', { name: /Workload per person/ });
    const ines = within(team).getByRole('row', { name: /Ines Marlow/ });
    expect(within(ines).getAllByRole('cell').map((c) => c.textContent)).toEqual(['4', '2', '7', '19 min', '1 past SLA']);
    const teo = within(team).getByRole('row', { name: /Teo Vance/ });
    expect(within(teo).getAllByRole('cell').map((c) => c.textContent)).toEqual(['1', '1', '3', '–', 'none']);
    expect(within(team).getByRole('row', { name: /Unassigned/ })).toHaveTextContent('2 past SLA');
    // Charts come with their numbers as text.
    expect(screen.getByText('11 open cases, 3 past SLA, by time since the case opened.')).toBeInTheDocument();
    expect(screen.getByRole('table', { name: 'Open cases by age' })).toBeInTheDocument();
    expect(screen.getByText(/Capacity 2\.0 cases an hour/)).toBeInTheDocument();
  });

  it('picking a person filters the open cases to theirs', async () => {
    const api = stubFetch(boardRoutes());
    const { user } = await openBoard();
    await screen.findByRole('table', { name: /Open cases, soonest/ });
    await user.click(screen.getByRole('button', { name: 'Ines Marlow' }));
    await waitFor(() => {
      const last = api.calls.filter((c) => c.path === '/api/cases').length;
      expect(last).toBeGreaterThanOrEqual(2);
    });
    expect(screen.getByRole('button', { name: 'Ines Marlow' })).toHaveAttribute('aria-pressed', 'true');
    const urls = (fetch as unknown as { mock: { calls: [string][] } }).mock.calls.map(([u]) => String(u)).filter((u) => u.startsWith('/api/cases?'));
    expect(new URLSearchParams(urls.at(-1)!.split('?')[1]).get('assignee')).toBe('1');
  });

  it('reassigns the selected cases in one request and says who has them', async () => {
    const api = stubFetch(
      boardRoutes({
        'POST /api/cases/reassign': (req) => ({
          status: 200,
          body: { cases: (req.body as { caseIds: number[] }).caseIds.map((id) => caseSummary(id)), assignee: { id: 5, displayName: 'Teo Vance' } },
        }),
      }),
    );
    const { user } = await openBoard();
    const table = await screen.findByRole('table', { name: /Open cases, soonest/ });
    const reassign = screen.getByRole('button', { name: /^Reassign/ });
    expect(reassign).toBeDisabled();
    await user.click(within(table).getByRole('checkbox', { name: 'Select case 41' }));
    await user.click(within(table).getByRole('checkbox', { name: 'Select case 43' }));
    expect(screen.getByText(/2 selected/)).toBeInTheDocument();
    await user.keyboard('r');
    const dialog = await screen.findByRole('dialog', { name: 'Reassign 2 cases' });
    await user.selectOptions(within(dialog).getByRole('combobox', { name: 'Hand to' }), '5');
    await user.type(within(dialog).getByRole('textbox', { name: /Note/ }), 'Ines is out this afternoon');
    await user.click(within(dialog).getByRole('button', { name: 'Reassign 2' }));
    expect(await screen.findByText(/2 cases now with Teo Vance/)).toBeInTheDocument();
    const [call] = api.callsTo('POST', '/api/cases/reassign');
    expect(call.body).toEqual({ caseIds: [41, 43], assigneeId: 5, note: 'Ines is out this afternoon' });
    expect(call.headers['x-csrf-token']).toBe(CSRF);
    expect(screen.queryByRole('dialog')).not.toBeInTheDocument();
  });

  it('shows which cases refused a reassignment (none moved)', async () => {
    stubFetch(
      boardRoutes({
        'POST /api/cases/reassign': {
          status: 409,
          body: { error: { code: 'reassign_refused', message: 'Nothing was reassigned: #42 (closed).', refused: [{ id: 42, reason: 'closed' }] } },
        },
      }),
    );
    const { user } = await openBoard();
    const table = await screen.findByRole('table', { name: /Open cases, soonest/ });
    await user.click(within(table).getByRole('checkbox', { name: 'Select every case on this page' }));
    await user.click(screen.getByRole('button', { name: /^Reassign 3/ }));
    const dialog = await screen.findByRole('dialog');
    await user.selectOptions(within(dialog).getByRole('combobox', { name: 'Hand to' }), '1');
    await user.click(within(dialog).getByRole('button', { name: 'Reassign 3' }));
    const alert = await within(dialog).findByRole('alert');
    expect(alert).toHaveTextContent('Nothing was reassigned');
    expect(within(alert).getByRole('listitem')).toHaveTextContent('#42: closed');
  });

  it('refetches the board when the socket says a case changed', async () => {
    const api = stubFetch(boardRoutes());
    await openBoard();
    await screen.findByRole('table', { name: /Workload per person/ });
    const before = api.callsTo('GET', '/api/board').length;
    act(() => currentSocket().serverConnect());
    act(() => currentSocket().serverEmit('queue:case-changed', { type: 'case.changed', caseId: 41, status: 'claimed', assigneeId: 5, previousAssigneeId: 1, at: '2031-05-06T10:00:00.000Z' }));
    await waitFor(() => expect(api.callsTo('GET', '/api/board').length).toBeGreaterThan(before));
    await waitFor(() => expect(api.callsTo('GET', '/api/approvals').length).toBeGreaterThan(1));
  });
});

describe('Board: approvals', { timeout: 30_000 }, () => {
  it('approves another person’s proposal and returns one with a required note; never offers the reader their own', async () => {
    let items = [approvalFixture(1, 1), approvalFixture(2, users.supervisor.id)];
    const api = stubFetch(
      boardRoutes(
        {
          'POST /api/approvals/1/approve': () => {
            items = items.filter((a) => a.id !== 1);
            return { status: 200, body: { case: caseSummary(701, { status: 'closed' }) } };
          },
          'POST /api/approvals/3/reject': { status: 200, body: { case: caseSummary(703, { status: 'claimed' }) } },
        },
        () => items,
      ),
    );
    const { user } = await openBoard();
    const list = await screen.findByRole('region', { name: /Approvals/ });
    await within(list).findByText('#701');
    const own = within(list).getByText('#702').closest('li')!;
    expect(within(own).getByText('Your proposal: another supervisor decides.')).toBeInTheDocument();
    expect(within(own).queryByRole('button')).not.toBeInTheDocument();
    expect(within(list).getByRole('complementary', { name: 'About the score' })).toBeInTheDocument();

    await user.click(within(list).getByRole('button', { name: 'Approve #701' }));
    await waitFor(() => expect(within(list).queryByText('#701')).not.toBeInTheDocument());
    expect(api.callsTo('POST', '/api/approvals/1/approve')).toHaveLength(1);

    items = [approvalFixture(3, 1)];
    act(() => currentSocket().serverConnect());
    act(() => currentSocket().serverEmit('queue:case-changed', { type: 'case.changed', caseId: 703, status: 'awaiting_approval', assigneeId: 1, at: '2031-05-06T10:00:00.000Z' }));
    await within(list).findByText('#703');
    await user.click(within(list).getByRole('button', { name: 'Return…' }));
    const dialog = await screen.findByRole('dialog', { name: 'Return case #703 to Ines Marlow' });
    const send = within(dialog).getByRole('button', { name: 'Return with note' });
    expect(send).toBeDisabled();
    await user.type(within(dialog).getByRole('textbox'), 'Attach the statement');
    await user.click(send);
    await waitFor(() => expect(api.callsTo('POST', '/api/approvals/3/reject')).toHaveLength(1));
    expect(api.callsTo('POST', '/api/approvals/3/reject')[0].body).toEqual({ note: 'Attach the statement' });
  });
});

describe('Board: threshold from capacity', { timeout: 30_000 }, () => {
  it('turns a daily capacity into a threshold on the curve, shows its precision and recall, and saves both', async () => {
    const api = stubFetch(
      boardRoutes({
        'GET /api/settings/threshold-curve': { status: 200, body: curveFixture() },
        'PUT /api/settings/threshold': (req) => ({ status: 200, body: settingsFixture({ ...(req.body as object) }) }),
      }),
    );
    const { user } = await openBoard('/board?tab=threshold');
    const field = await screen.findByRole('spinbutton', { name: 'Cases a day' });
    // The saved capacity (48) is where it starts: 48 cases a day first fit at 77 % on this curve.
    expect(field).toHaveValue(48);
    await user.clear(field);
    await user.type(field, '60');
    // 200 - 2i <= 60 first at i = 70: threshold 71 %, 60 cases and 90 alerts a day, precision 71 %, recall 29 %.
    const summary = screen.getByRole('status', { name: 'Where this lands' });
    await waitFor(() => expect(summary).toHaveTextContent(/At 71\.0\s%: about 60\.0 cases and 90\.0 alerts a day; precision 71\.0 %, recall 29\.0 %/));
    expect(screen.getByText(/Precision and recall from the champion's held-out evaluation/)).toBeInTheDocument();
    await user.click(screen.getByRole('button', { name: 'Use this threshold' }));
    const dialog = await screen.findByRole('dialog', { name: 'Change the alert threshold?' });
    expect(dialog).toHaveTextContent(/about 102 → 60\.0/);
    await user.click(within(dialog).getByRole('button', { name: 'Change threshold' }));
    await waitFor(() => expect(api.callsTo('PUT', '/api/settings/threshold')).toHaveLength(1));
    expect(api.callsTo('PUT', '/api/settings/threshold')[0].body).toEqual({ threshold: 0.71, dailyCapacity: 60 });
    expect(await screen.findByText(/Saved: the next transaction is scored against 71\.0/)).toBeInTheDocument();
  });

  it('takes a threshold as typed and says when precision comes from labelled transactions', async () => {
    stubFetch(boardRoutes({ 'GET /api/settings/threshold-curve': { status: 200, body: curveFixture({ precisionSource: 'labelled_scores', precisionNote: 'No histogram stored.' }) } }));
    const { user } = await openBoard('/board?tab=threshold');
    await user.click(await screen.findByRole('radio', { name: 'A probability threshold' }));
    const field = screen.getByRole('spinbutton', { name: 'Threshold (%)' });
    await user.clear(field);
    await user.type(field, '35');
    await waitFor(() => expect(screen.getByRole('status', { name: 'Where this lands' })).toHaveTextContent(/At 35\.0\s%: about 132 cases/));
    expect(screen.getByText(/labelled transactions the champion scored/)).toBeInTheDocument();
  });
});

describe('Board: SLA and routing', { timeout: 30_000 }, () => {
  it('checks the SLA bands and sends probabilities as fractions', async () => {
    const api = stubFetch(boardRoutes({ 'PUT /api/settings/sla': (req) => ({ status: 200, body: settingsFixture({ sla: req.body as never }) }) }));
    const { user } = await openBoard('/board?tab=policy');
    const high = await screen.findByRole('spinbutton', { name: 'High from probability (%)' });
    await user.clear(high);
    await user.type(high, '95');
    await user.click(screen.getByRole('button', { name: 'Save SLA policy' }));
    expect(await screen.findByText('The high band starts below the urgent band')).toBeInTheDocument();
    expect(api.callsTo('PUT', '/api/settings/sla')).toHaveLength(0);
    await user.clear(high);
    await user.type(high, '65');
    const urgent = screen.getByRole('spinbutton', { name: 'Urgent: minutes' });
    await user.clear(urgent);
    await user.type(urgent, '20');
    await user.click(screen.getByRole('button', { name: 'Save SLA policy' }));
    await waitFor(() => expect(api.callsTo('PUT', '/api/settings/sla')).toHaveLength(1));
    expect(api.callsTo('PUT', '/api/settings/sla')[0].body).toEqual({ slaMinutes: { urgent: 20, high: 120, standard: 480 }, priorityBands: { urgent: 0.9, high: 0.65 } });
  });

  it('drafts a rule, previews yesterday against it, and saves the ordered list', async () => {
    const routing = {
      groups: [{ id: 9, name: 'High value desk', strategy: 'round_robin', members: [{ id: 1, displayName: 'Ines Marlow', active: true }] }],
      rules: [],
      people: [{ id: 1, displayName: 'Ines Marlow', role: 'investigator' }],
    };
    const api = stubFetch(
      boardRoutes({
        'GET /api/routing': { status: 200, body: routing },
        'POST /api/routing/preview': (req) => ({
          status: 200,
          body: { day: '2031-05-05', total: 120, perRule: (req.body as { rules: { name: string }[] }).rules.map((r, i) => ({ position: i + 1, name: r.name, count: 17 })), unmatched: 103 },
        }),
        'PUT /api/routing/rules': (req) => ({ status: 200, body: { ...routing, rules: (req.body as { rules: object[] }).rules.map((r, i) => ({ ...r, id: i + 1, position: i + 1 })) } }),
      }),
    );
    const { user } = await openBoard('/board?tab=routing');
    await user.click(await screen.findByRole('button', { name: 'Add a rule' }));
    const rule = () => screen.getByRole('listitem', { name: /Rule 1/ });
    expect(within(rule()).getByText(/\(name\)$/)).toBeInTheDocument();
    await user.type(within(rule()).getByRole('textbox', { name: 'Rule name' }), 'Big online');
    expect(within(rule()).getByText('Give at least one condition (minAmount)')).toBeInTheDocument();
    await user.type(within(rule()).getByRole('spinbutton', { name: 'At risk above' }), '5000');
    await user.click(within(rule()).getByRole('checkbox', { name: 'Online' }));
    expect(await within(rule()).findByText("Would have taken 17 of yesterday's cases", {}, { timeout: 5000 })).toBeInTheDocument();
    expect(screen.getByText(/Yesterday \(2031-05-05, UTC\) opened 120 cases; 103 would have stayed/)).toBeInTheDocument();
    await user.click(screen.getByRole('button', { name: 'Save rules' }));
    await waitFor(() => expect(api.callsTo('PUT', '/api/routing/rules')).toHaveLength(1));
    expect(api.callsTo('PUT', '/api/routing/rules')[0].body).toEqual({
      rules: [{ name: 'Big online', minAmount: 5000, mccs: [], countries: [], channels: ['ecommerce'], groupId: 9, enabled: true }],
    });
  });
});
