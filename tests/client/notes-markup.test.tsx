import { configure, screen, waitFor, within } from '@testing-library/react';
import { describe, expect, it } from 'vitest';
import { caseDetail } from './support/case-fixtures';
import { signedInRoutes, stubFetch } from './support/fetch-stub';
import { renderApp } from './support/render-app';

// The case file loads lazily and the test types a whole line; a busy machine needs more than the default wait.
configure({ asyncUtilTimeout: 5000 });

/**
 * Markup typed by an investigator (a note, an e-mail, an evidence file name)
 * is shown as text: React escapes text content (OWASP XSS Prevention Cheat
 * Sheet, rule 1: encode before inserting into HTML element content), so no
 * element is ever made from it. jsdom builds real elements from markup, so an
 * injected <img> or <script> would be found below.
 */
const IMG = '<img src=x onerror="window.__pwned=1">';
const SCRIPT = '<script>window.__pwned=2</script>';
const SVG = '"><svg onload="window.__pwned=3">';

const hostileCase = () =>
  caseDetail(7, {
    notes: [
      { id: 1, author: { id: 2, displayName: 'Sam Okafor' }, text: IMG, createdAt: '2031-05-06T09:55:00.000Z' },
      { id: 2, author: { id: 2, displayName: 'Sam Okafor' }, text: `${SCRIPT}\n${SVG}`, createdAt: '2031-05-06T09:56:00.000Z' },
    ],
    messages: [
      {
        id: 3,
        to: 'rowan.ash@example.org',
        subject: `Re: ${IMG}`,
        text: SCRIPT,
        sentBy: { id: 1, displayName: 'Ines Marlow' },
        createdAt: '2031-05-06T09:57:00.000Z',
        status: 'sent',
      },
    ],
    evidence: [{ id: 4, fileName: `${IMG}.png`, contentType: 'image/png', size: 120, uploadedBy: { id: 1, displayName: 'Ines Marlow' }, createdAt: '2031-05-06T09:58:00.000Z' }],
  });

function expectNoInjectedElements(root: HTMLElement) {
  expect(root.querySelectorAll('script')).toHaveLength(0);
  expect(root.querySelectorAll('img[src="x"]')).toHaveLength(0);
  expect(root.querySelectorAll('svg[onload], [onerror], [onload]')).toHaveLength(0);
  expect((window as unknown as { __pwned?: number }).__pwned).toBeUndefined();
}

describe('markup in case text', { timeout: 20_000 }, () => {
  it('renders notes, e-mails and evidence names with markup as the text that was typed, creating no element', async () => {
    stubFetch({
      ...signedInRoutes('investigator'),
      'GET /api/cases/7': { status: 200, body: hostileCase() },
      'GET /api/models/5/scoring-model': { status: 404, body: { error: { code: 'not_found', message: 'No model.' } } },
    });
    const { container } = renderApp('/cases/7');
    await screen.findByRole('heading', { level: 1, name: /Case file 7/ }, { timeout: 5000 });
    const notes = within(screen.getByRole('region', { name: 'Notes' })).getByRole('list', { name: 'Notes' });
    expect(within(notes).getByText(IMG)).toBeInTheDocument();
    expect(notes).toHaveTextContent(SCRIPT);
    expect(notes).toHaveTextContent(SVG);
    expect(container).toHaveTextContent(`Re: ${IMG}`);
    expect(screen.getByText(`${IMG}.png`)).toBeInTheDocument();
    expectNoInjectedElements(container);
  });

  it('sends a note with markup exactly as typed, and shows it back as text', async () => {
    let detail = caseDetail(7, { notes: [] });
    const api = stubFetch({
      ...signedInRoutes('investigator'),
      'GET /api/cases/7': () => ({ status: 200, body: detail }),
      'GET /api/models/5/scoring-model': { status: 404, body: { error: { code: 'not_found', message: 'No model.' } } },
      'POST /api/cases/7/notes': (req) => {
        const note = { id: 9, author: { id: 1, displayName: 'Ines Marlow' }, text: (req.body as { text: string }).text, createdAt: '2031-05-06T10:01:00.000Z' };
        detail = { ...detail, notes: [note] };
        return { status: 201, body: { note } };
      },
    });
    const { container, user } = renderApp('/cases/7');
    await screen.findByRole('heading', { level: 1, name: /Case file 7/ }, { timeout: 5000 });
    const box = within(screen.getByRole('region', { name: 'Notes' })).getByLabelText('New note');
    // user-event reads { and [ as key descriptors: doubled, they are typed as themselves.
    await user.type(box, IMG.replace(/[{[]/g, (c) => c + c));
    await user.keyboard('{Control>}{Enter}{/Control}');
    await waitFor(() => expect(api.callsTo('POST', '/api/cases/7/notes')).toHaveLength(1));
    expect(api.callsTo('POST', '/api/cases/7/notes')[0].body).toEqual({ text: IMG });
    const notes = await within(screen.getByRole('region', { name: 'Notes' })).findByRole('list', { name: 'Notes' });
    expect(within(notes).getByText(IMG)).toBeInTheDocument();
    expectNoInjectedElements(container);
  });
});
