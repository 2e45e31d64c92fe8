import { configure, fireEvent, screen, waitFor, within } from '@testing-library/react';
import { describe, expect, it, vi } from 'vitest';
import { SCORE_CAUTION } from '@/components/ui/caution-note';
import { alertDetail } from './support/alert-fixture';
import { caseDetail, caseSummary } from './support/case-fixtures';
import { CSRF, signedInRoutes, stubFetch } from './support/fetch-stub';
import { renderApp } from './support/render-app';

// These tests load lazy screens and type whole sentences; a busy machine needs more than the default second.
configure({ asyncUtilTimeout: 4000 });

type Routes = Parameters<typeof stubFetch>[0];
type FetchMock = { mock: { calls: [string, RequestInit | undefined][] } };

function caseRoutes(extra: Routes = {}): Routes {
  return {
    ...signedInRoutes('investigator'),
    'GET /api/cases/7': { status: 200, body: caseDetail(7) },
    'GET /api/models/5/scoring-model': { status: 404, body: { error: { code: 'not_found', message: 'Model not stored here.' } } },
    ...extra,
  };
}

async function openCase(path = '/cases/7') {
  const app = renderApp(path);
  await screen.findByRole('heading', { level: 1, name: /Case file 7/ }, { timeout: 5000 });
  return app;
}

const panel = (name: string) => screen.getByRole('region', { name });

describe('Case file', { timeout: 20_000 }, () => {
  it('loads the case before rendering and shows its header, reasons, activity and notes', async () => {
    const api = stubFetch(caseRoutes());
    await openCase();
    // The loader fetched it once; the page did not fetch it again on mount.
    expect(api.callsTo('GET', '/api/cases/7')).toHaveLength(1);

    expect(screen.getByRole('img', { name: 'Recommended: review' })).toBeInTheDocument();
    expect(screen.getAllByLabelText('Card 491761, ending 1007').length).toBeGreaterThan(0);
    expect(screen.getByText('EUR 1,240.07')).toBeInTheDocument();
    expect(screen.getByText('You (Ines Marlow)')).toBeInTheDocument();

    const reasons = panel('Why it scored high');
    expect(within(reasons).getByRole('cell', { name: 'amount 1,240.00 > 610.00: +0.38' })).toBeInTheDocument();
    expect(within(reasons).getByRole('cell', { name: 'channel = pos: -0.12' })).toBeInTheDocument();
    expect(within(reasons).getAllByText(/v5 \(champion\)/).length).toBeGreaterThan(0);

    const activity = panel('Card activity');
    const thisCaseRow = within(activity).getByText('this case').closest('tr')!;
    expect(thisCaseRow).toHaveTextContent('Kettle & Pine Grocers');
    expect(within(activity).getByRole('link', { name: 'Case 88' })).toHaveAttribute('href', '/cases/88');
    expect(within(activity).getByText('same device')).toBeInTheDocument();

    // Notes are text: markup in them shows as typed and never becomes elements.
    const notes = within(panel('Notes')).getByRole('list', { name: 'Notes' });
    expect(notes).toHaveTextContent('Called twice, <b>no answer</b>.');
    expect(notes.querySelector('b')).toBeNull();

    // The what-if panel fails on its own; the rest of the page stands.
    expect(await within(panel('What-if')).findByRole('alert')).toHaveTextContent('Model not stored here.');
    expect(within(panel('Timeline')).getByText('case.claim')).toBeInTheDocument();
  });

  it('says which team the case was routed to', async () => {
    stubFetch(caseRoutes({ 'GET /api/cases/7': { status: 200, body: caseDetail(7, { case: { ...caseSummary(7), team: { id: 2, name: 'Travel desk' } } }) } }));
    await openCase();
    expect(screen.getByText('Team').nextElementSibling).toHaveTextContent('Travel desk');
  });

  it('says when the case is in the shared queue', async () => {
    stubFetch(caseRoutes());
    await openCase();
    expect(screen.getByText('Team').nextElementSibling).toHaveTextContent('Shared queue');
  });

  it('switches between the case’s alerts, highest first', async () => {
    const low = alertDetail({ alertId: 40, probability: 0.41, reasons: [{ feature: 'hour_utc', value: 3, contribution: 0.2, text: 'hour_utc 3.00 <= 5.50: +0.20' }] });
    const high = alertDetail({ alertId: 41, probability: 0.93 });
    stubFetch(caseRoutes({ 'GET /api/cases/7': { status: 200, body: caseDetail(7, { alerts: [low, high] }) } }));
    const { user } = await openCase();
    const reasons = panel('Why it scored high');
    expect(within(reasons).getByRole('cell', { name: 'amount 1,240.00 > 610.00: +0.38' })).toBeInTheDocument();
    await user.keyboard(']');
    expect(within(reasons).getByRole('cell', { name: 'hour_utc 3.00 <= 5.50: +0.20' })).toBeInTheDocument();
    expect(within(reasons).queryByRole('cell', { name: 'amount 1,240.00 > 610.00: +0.38' })).not.toBeInTheDocument();
  });

  it('adds a note from the keyboard: n to write, Ctrl+Enter to add', async () => {
    const api = stubFetch(
      caseRoutes({
        'POST /api/cases/7/notes': { status: 201, body: { note: { id: 2, author: { id: 1, displayName: 'Ines Marlow' }, text: 'Merchant confirms.', createdAt: '2031-05-06T10:01:00.000Z' } } },
      }),
    );
    const { user } = await openCase();
    await user.keyboard('n');
    expect(within(panel('Notes')).getByLabelText('New note')).toHaveFocus();
    await user.keyboard('Merchant confirms.');
    await user.keyboard('{Control>}{Enter}{/Control}');
    await waitFor(() => expect(api.callsTo('POST', '/api/cases/7/notes')).toHaveLength(1));
    expect(api.callsTo('POST', '/api/cases/7/notes')[0].body).toEqual({ text: 'Merchant confirms.' });
    // Ctrl+Enter in the note saved the note, not the disposition.
    expect(api.callsTo('POST', '/api/cases/7/disposition')).toHaveLength(0);
    await waitFor(() => expect(within(panel('Notes')).getByLabelText('New note')).toHaveValue(''));
    await waitFor(() => expect(api.callsTo('GET', '/api/cases/7').length).toBeGreaterThan(1));
  });

  it('checks evidence type and size before uploading, then sends the file as multipart', async () => {
    const api = stubFetch(
      caseRoutes({
        'POST /api/cases/7/evidence': {
          status: 201,
          body: { evidence: { id: 3, fileName: 'statement.pdf', contentType: 'application/pdf', size: 9, uploadedBy: { id: 1, displayName: 'Ines Marlow' }, createdAt: '2031-05-06T10:02:00.000Z' } },
        },
      }),
    );
    await openCase();
    const input = within(panel('Evidence')).getByLabelText('Attach a file');

    // The picker's accept list is only a hint to the browser ("all files" gets past it), so pick files directly.
    const pick = (file: File) => fireEvent.change(input, { target: { files: [file] } });
    pick(new File(['MZ'], 'tool.exe', { type: 'application/x-msdownload' }));
    expect(await within(panel('Evidence')).findByRole('alert')).toHaveTextContent('tool.exe: Attach a PNG or JPEG image, a PDF or a CSV file.');
    const big = new File(['x'], 'scan.png', { type: 'image/png' });
    Object.defineProperty(big, 'size', { value: 10 * 1024 * 1024 + 1 });
    pick(big);
    expect(within(panel('Evidence')).getByRole('alert')).toHaveTextContent('scan.png: The file is larger than 10 MB.');
    expect(api.callsTo('POST', '/api/cases/7/evidence')).toHaveLength(0);

    pick(new File(['%PDF-1.7'], 'statement.pdf', { type: 'application/pdf' }));
    await waitFor(() => expect(api.callsTo('POST', '/api/cases/7/evidence')).toHaveLength(1));
    const [, init] = (fetch as unknown as FetchMock).mock.calls.find(([url]) => url === '/api/cases/7/evidence')!;
    const sent = (init!.body as FormData).get('file') as File;
    expect(sent.name).toBe('statement.pdf');
    expect(api.callsTo('POST', '/api/cases/7/evidence')[0].headers['x-csrf-token']).toBe(CSRF);
  });

  it('blocks the card only after a confirmation that repeats the caution, with a reason', async () => {
    const api = stubFetch(caseRoutes({ 'POST /api/cases/7/card': { status: 200, body: { card: { bin: '491761', last4: '1007', status: 'blocked' } } } }));
    const { user } = await openCase();
    await user.click(within(panel('Card')).getByRole('button', { name: 'Block card…' }));
    const dialog = screen.getByRole('dialog', { name: 'Block card 491761 ••• 1007?' });
    expect(within(dialog).getByRole('complementary', { name: 'About the score' })).toHaveTextContent(SCORE_CAUTION);

    await user.click(within(dialog).getByRole('button', { name: 'Block card' }));
    expect(await within(dialog).findByText('Write at least 5 characters.')).toBeInTheDocument();
    expect(api.callsTo('POST', '/api/cases/7/card')).toHaveLength(0);

    await user.type(within(dialog).getByLabelText(/Reason/), 'Cardholder reports the card stolen.');
    await user.click(within(dialog).getByRole('button', { name: 'Block card' }));
    await waitFor(() => expect(screen.queryByRole('dialog')).not.toBeInTheDocument());
    expect(api.callsTo('POST', '/api/cases/7/card')[0].body).toEqual({ action: 'block', reason: 'Cardholder reports the card stolen.' });
  });

  it('e-mails the cardholder and escalates with a reason', async () => {
    const api = stubFetch(
      caseRoutes({
        'POST /api/cases/7/contact': {
          status: 201,
          body: { message: { id: 1, to: 'rowan.ash@example.org', subject: 'About your card', text: 'x', sentBy: { id: 1, displayName: 'Ines Marlow' }, createdAt: '2031-05-06T10:03:00.000Z', status: 'queued' } },
        },
        'POST /api/cases/7/escalate': { status: 200, body: {} },
      }),
    );
    const { user } = await openCase();
    const contact = panel('Contact cardholder');
    expect(contact).toHaveTextContent('rowan.ash@example.org');
    await user.type(within(contact).getByLabelText('Subject'), 'About your card');
    await user.type(within(contact).getByLabelText('Message'), 'Did you make two payments this morning?');
    await user.click(within(contact).getByRole('button', { name: 'Send to cardholder' }));
    await waitFor(() => expect(api.callsTo('POST', '/api/cases/7/contact')).toHaveLength(1));
    expect(api.callsTo('POST', '/api/cases/7/contact')[0].body).toEqual({ subject: 'About your card', message: 'Did you make two payments this morning?' });

    const escalate = panel('Escalate');
    await user.type(within(escalate).getByLabelText(/Why escalate/), 'Amount above my approval limit.');
    await user.click(within(escalate).getByRole('button', { name: 'Escalate' }));
    await waitFor(() => expect(api.callsTo('POST', '/api/cases/7/escalate')).toHaveLength(1));
    expect(api.callsTo('POST', '/api/cases/7/escalate')[0].body).toEqual({ reason: 'Amount above my approval limit.' });
  });

  it('claims with c, and names who has the case when the claim is refused', async () => {
    stubFetch(
      caseRoutes({
        'GET /api/cases/7': { status: 200, body: caseDetail(7, { case: { ...caseSummary(7), status: 'new', assignee: null } }) },
        'POST /api/cases/7/claim': {
          status: 409,
          body: { error: { code: 'already_claimed', message: 'Claimed.', claimedBy: { id: 9, displayName: 'Noor Vance' } } },
        },
      }),
    );
    const { user } = await openCase();
    await user.keyboard('c');
    expect(await screen.findByText('Already claimed by Noor Vance')).toBeInTheDocument();
  });

  it('keeps the page when one panel fails to render', async () => {
    vi.spyOn(console, 'error').mockImplementation(() => {});
    const broken = caseDetail(7);
    // A probability outside [0, 1] makes the risk scale throw inside the activity table.
    broken.activity[0].probability = 5;
    stubFetch(caseRoutes({ 'GET /api/cases/7': { status: 200, body: broken } }));
    await openCase();
    expect(within(panel('Card activity')).getByRole('alert')).toHaveTextContent('Card activity could not be shown.');
    expect(screen.getByRole('form', { name: 'Disposition' })).toBeInTheDocument();
  });
});
