import { act, fireEvent, screen, waitFor, within } from '@testing-library/react';
import { beforeEach, describe, expect, it, vi } from 'vitest';
import { BACKFILL_PROGRESS_EVENT, type BackfillImport, type BackfillProgressEvent } from '@shared/api/backfill';
import { currentSocket } from './support/fake-socket';
import { CSRF, signedInRoutes, stubFetch, users } from './support/fetch-stub';
import { renderApp } from './support/render-app';

/** Enough of XMLHttpRequest for the upload; the test plays the server. */
class FakeXhr {
  static sent: FakeXhr[] = [];
  method = '';
  url = '';
  headers: Record<string, string> = {};
  body: FormData | null = null;
  status = 0;
  responseText = '';
  responseType = '';
  upload: { onprogress: ((e: { loaded: number; total: number; lengthComputable: boolean }) => void) | null } = { onprogress: null };
  onload: (() => void) | null = null;
  onerror: (() => void) | null = null;
  onabort: (() => void) | null = null;

  open(method: string, url: string) {
    this.method = method;
    this.url = url;
  }
  setRequestHeader(name: string, value: string) {
    this.headers[name.toLowerCase()] = value;
  }
  send(body: FormData) {
    this.body = body;
    FakeXhr.sent.push(this);
  }
  abort() {
    this.onabort?.();
  }
  progress(loaded: number, total: number) {
    this.upload.onprogress?.({ loaded, total, lengthComputable: true });
  }
  respond(status: number, body: unknown) {
    this.status = status;
    this.responseText = JSON.stringify(body);
    this.onload?.();
  }
}

const FILE_BYTES = 2000;
const csvFile = () => new File(['x'.repeat(FILE_BYTES)], 'history.csv', { type: 'text/csv' });

function run(over: Omit<Partial<BackfillImport>, 'counts'> & { counts?: Partial<BackfillImport['counts']> } = {}): BackfillImport {
  const { counts, ...rest } = over;
  return {
    id: 41,
    fileName: 'history.csv',
    status: 'running',
    counts: { rowsRead: 0, accepted: 0, duplicate: 0, rejected: 0, labelsAdded: 0, bytesRead: 0, ...counts },
    startedAt: '2026-11-30T14:03:00.000Z',
    finishedAt: null,
    error: null,
    errorReportUrl: null,
    uploadedBy: { id: users.data_scientist.id, displayName: users.data_scientist.displayName },
    ...rest,
  };
}

function setup(imports: BackfillImport[] = []) {
  const api = stubFetch({ ...signedInRoutes('data_scientist'), 'GET /api/backfill': { status: 200, body: { imports } } });
  const app = renderApp('/data');
  return { api, ...app };
}

async function startUpload(user: ReturnType<typeof setup>['user']) {
  await screen.findByRole('heading', { level: 1, name: 'Data' });
  await user.upload(screen.getByLabelText('CSV file'), csvFile());
  await user.click(screen.getByRole('button', { name: 'Start import' }));
  await waitFor(() => expect(FakeXhr.sent).toHaveLength(1));
  const xhr = FakeXhr.sent[0];
  const clientRef = String(xhr.body!.get('clientRef'));
  const emit = (r: BackfillImport, ref = clientRef) =>
    act(() => currentSocket().serverEmit(BACKFILL_PROGRESS_EVENT, { ...r, clientRef: ref } satisfies BackfillProgressEvent));
  return { xhr, clientRef, emit };
}

const countsRow = () => {
  const table = screen.getByRole('table', { name: 'Rows of this file so far' });
  return within(table).getAllByRole('cell').map((c) => c.textContent);
};

beforeEach(() => {
  FakeXhr.sent = [];
  vi.stubGlobal('XMLHttpRequest', FakeXhr);
});

describe('Data screen: CSV back-fill', () => {
  it('renders the upload form with visible labels, the card-number note and recent imports', async () => {
    setup([run({ id: 7, status: 'completed', counts: { rowsRead: 120, accepted: 118, rejected: 2 }, errorReportUrl: '/api/backfill/7/errors.csv' })]);
    await screen.findByRole('heading', { level: 1, name: 'Data' });
    expect(screen.getByLabelText('CSV file')).toHaveAttribute('type', 'file');
    expect(screen.getByText('Card numbers in uploaded files are tokenised on arrival and never stored.')).toBeInTheDocument();
    expect(screen.getByRole('button', { name: 'Start import' })).toBeDisabled();
    const recent = await screen.findByRole('table', { name: 'Your recent imports' });
    expect(within(recent).getByRole('link', { name: 'Error report of import 7' })).toHaveAttribute('href', '/api/backfill/7/errors.csv');
  });

  it('refuses a drop of several files instead of importing the first of them', async () => {
    setup();
    await screen.findByRole('heading', { level: 1, name: 'Data' });
    const zone = screen.getByLabelText('CSV file').parentElement!;
    const files = [csvFile(), new File(['y'], 'more.csv', { type: 'text/csv' })];
    fireEvent.drop(zone, { dataTransfer: { files, types: ['Files'] } });
    expect(await screen.findByRole('alert')).toHaveTextContent('2 files were dropped; an import takes one file.');
    expect(screen.getByRole('button', { name: 'Start import' })).toBeDisabled();
    // One file dropped is taken.
    fireEvent.drop(zone, { dataTransfer: { files: [csvFile()], types: ['Files'] } });
    await waitFor(() => expect(screen.queryByRole('alert')).not.toBeInTheDocument());
    expect(screen.getByText(/Selected: history\.csv/)).toBeInTheDocument();
    expect(screen.getByRole('button', { name: 'Start import' })).toBeEnabled();
  });

  it('sends the file by XHR with the CSRF token, then shows sent bytes and the server’s counts from the socket', async () => {
    const { user } = setup();
    const { xhr, clientRef, emit } = await startUpload(user);
    expect(xhr.method).toBe('POST');
    expect(xhr.url).toBe('/api/backfill/transactions');
    expect(xhr.headers['x-csrf-token']).toBe(CSRF);
    expect((xhr.body!.get('file') as File).name).toBe('history.csv');
    expect(clientRef.length).toBeGreaterThanOrEqual(8);

    act(() => xhr.progress(FILE_BYTES / 4, FILE_BYTES));
    expect(screen.getByRole('progressbar', { name: 'Sent' })).toHaveAttribute('aria-valuenow', '25');

    emit(run({ counts: { rowsRead: 600, accepted: 590, duplicate: 6, rejected: 0, labelsAdded: 12, bytesRead: FILE_BYTES / 2 } }));
    expect(screen.getByRole('progressbar', { name: 'Processed on the server' })).toHaveAttribute('aria-valuenow', '50');
    expect(countsRow()).toEqual(['600', '590', '6', '0', '12']);
    expect(screen.getByText('Processing: 600 rows read.')).toHaveAttribute('role', 'status');
    expect(screen.queryByRole('link', { name: 'Download error report' })).not.toBeInTheDocument();
  });

  it('offers the error report once the server reports rejected rows', async () => {
    const { user } = setup();
    const { emit } = await startUpload(user);
    emit(run({ counts: { rowsRead: 1200, accepted: 1195, rejected: 5, bytesRead: FILE_BYTES }, errorReportUrl: '/api/backfill/41/errors.csv' }));
    expect(screen.getByRole('link', { name: 'Download error report' })).toHaveAttribute('href', '/api/backfill/41/errors.csv');
    expect(countsRow()).toEqual(['1,200', '1,195', '0', '5', '0']);
  });

  it('ignores progress of another tab’s upload', async () => {
    const { user } = setup();
    const { emit } = await startUpload(user);
    emit(run({ id: 99, counts: { rowsRead: 50, rejected: 3 }, errorReportUrl: '/api/backfill/99/errors.csv' }), 'someone-elses-ref');
    expect(countsRow()).toEqual(['–', '–', '–', '–', '–']);
    expect(screen.queryByRole('link', { name: 'Download error report' })).not.toBeInTheDocument();
  });

  it('shows the final summary when the upload answers, and reloads the list of imports', async () => {
    const { user, api } = setup();
    const { xhr } = await startUpload(user);
    const before = api.callsTo('GET', '/api/backfill').length;
    act(() => xhr.respond(200, { import: run({ status: 'completed', counts: { rowsRead: 9, accepted: 4, rejected: 5, bytesRead: FILE_BYTES }, errorReportUrl: '/api/backfill/41/errors.csv' }) }));
    expect(await screen.findByText('Finished.')).toBeInTheDocument();
    expect(countsRow()).toEqual(['9', '4', '0', '5', '0']);
    expect(screen.getByRole('link', { name: 'Download error report' })).toBeInTheDocument();
    await waitFor(() => expect(api.callsTo('GET', '/api/backfill').length).toBeGreaterThan(before));
  });

  it('shows why the server refused the file', async () => {
    const { user } = setup();
    const { xhr } = await startUpload(user);
    act(() =>
      xhr.respond(400, {
        error: { code: 'invalid_header', message: 'The header row has unknown columns: "card.cvv".' },
        import: run({ status: 'failed', error: { code: 'invalid_header', message: 'The header row has unknown columns: "card.cvv".' } }),
      }),
    );
    expect(await screen.findByText('Stopped: The header row has unknown columns: "card.cvv".')).toBeInTheDocument();
  });
});
