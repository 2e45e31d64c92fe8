import { configure, screen, waitFor, within } from '@testing-library/react';
import { describe, expect, it } from 'vitest';
import { dispositionSchema } from '@shared/api/cases';
import { serializeModel } from '@shared/model/index';
import { caseDetail, caseSummary } from './support/case-fixtures';
import { CSRF, signedInRoutes, stubFetch } from './support/fetch-stub';
import { renderApp } from './support/render-app';
import { smallModel } from './support/small-model';

// These tests load lazy screens and type whole sentences; a busy machine needs more than the default second.
configure({ asyncUtilTimeout: 4000 });

type Routes = Parameters<typeof stubFetch>[0];

const model = JSON.parse(serializeModel(smallModel()));

function caseRoutes(extra: Routes = {}): Routes {
  return {
    ...signedInRoutes('investigator'),
    'GET /api/cases/7': { status: 200, body: caseDetail(7) },
    'GET /api/models/5/scoring-model': { status: 200, body: { model } },
    ...extra,
  };
}

const saved = (nextCaseId: number | null) => ({
  status: 200,
  body: { case: caseSummary(7, { status: 'closed', version: 4 }), nextCaseId },
});

async function openCase(path = '/cases/7') {
  const app = renderApp(path);
  const form = await screen.findByRole('form', { name: 'Disposition' }, { timeout: 5000 });
  return { ...app, form };
}

// Typing whole sentences with user-event, plus the first load of the lazy route, takes a few seconds.
describe('Disposition form', { timeout: 20_000 }, () => {
  it('asks for the fraud type only for confirmed fraud, always for a reason, and sends nothing until both are there', async () => {
    const api = stubFetch(caseRoutes({ 'POST /api/cases/7/disposition': saved(8), 'GET /api/cases/8': { status: 200, body: caseDetail(8) } }));
    const { user, form, location } = await openCase();
    const f = within(form);

    await user.click(f.getByRole('button', { name: /Save and close the case/ }));
    expect(await f.findByText('Choose confirmed fraud, legitimate or inconclusive.')).toBeInTheDocument();
    expect(f.getByText('Say why, in a few words at least')).toBeInTheDocument();
    expect(f.queryByRole('group', { name: 'Fraud type' })).not.toBeInTheDocument();

    await user.click(f.getByRole('radio', { name: /Confirmed fraud/ }));
    expect(f.getByRole('group', { name: 'Fraud type' })).toBeInTheDocument();
    await user.type(f.getByLabelText(/Reason/), 'Cardholder denies both payments on the phone.');
    await user.click(f.getByRole('button', { name: /Save and close the case/ }));
    expect(await f.findByText('Choose the fraud type')).toBeInTheDocument();
    expect(api.callsTo('POST', '/api/cases/7/disposition')).toHaveLength(0);

    // Legitimate needs no fraud type: the question goes away and the form saves.
    await user.click(f.getByRole('radio', { name: /Legitimate/ }));
    expect(f.queryByRole('group', { name: 'Fraud type' })).not.toBeInTheDocument();
    await user.click(f.getByRole('button', { name: /Save and close the case/ }));

    await waitFor(() => expect(api.callsTo('POST', '/api/cases/7/disposition')).toHaveLength(1));
    const [call] = api.callsTo('POST', '/api/cases/7/disposition');
    expect(call.body).toEqual({ disposition: 'legitimate', reason: 'Cardholder denies both payments on the phone.', version: 3 });
    expect(call.headers['x-csrf-token']).toBe(CSRF);
    await waitFor(() => expect(location()).toBe('/cases/8'));
    expect(await screen.findByText('Case 7 saved as legitimate.')).toBeInTheDocument();
  });

  it('picks dispositions with 1, 2 and 3 and saves with Ctrl+Enter, posting exactly the schema shape', async () => {
    const api = stubFetch(caseRoutes({ 'POST /api/cases/7/disposition': saved(null), 'GET /api/cases': { status: 200, body: { items: [], total: 0, page: 1, pageSize: 50, serverTime: '2031-05-06T10:00:00.000Z' } } }));
    const { user, form, location } = await openCase();
    const f = within(form);
    const radio = (name: RegExp) => f.getByRole('radio', { name });

    await user.keyboard('3');
    expect(radio(/Inconclusive/)).toBeChecked();
    await user.keyboard('2');
    expect(radio(/Legitimate/)).toBeChecked();
    await user.keyboard('1');
    expect(radio(/Confirmed fraud/)).toBeChecked();
    expect(radio(/Inconclusive/)).not.toBeChecked();

    await user.click(f.getByRole('radio', { name: 'Account takeover' }));
    await user.type(f.getByLabelText(/Amount confirmed/), '1240.00');
    await user.type(f.getByLabelText(/Reason/), '  New device, foreign IP, password reset, then two large payments.  ');
    await user.keyboard('{Control>}{Enter}{/Control}');

    await waitFor(() => expect(api.callsTo('POST', '/api/cases/7/disposition')).toHaveLength(1));
    const body = api.callsTo('POST', '/api/cases/7/disposition')[0].body as Record<string, unknown>;
    expect(body).toEqual({
      disposition: 'confirmed_fraud',
      fraudType: 'account_takeover',
      reason: 'New device, foreign IP, password reset, then two large payments.',
      amountConfirmed: '1240.00',
      version: 3,
    });
    // What was sent is what the server's own schema accepts, unchanged.
    expect(dispositionSchema.parse(body)).toEqual(body);
    await waitFor(() => expect(location()).toBe('/queue'));
    expect(await screen.findByText('Case 7 saved as confirmed fraud (account takeover).')).toBeInTheDocument();
  });

  it('shows the caution right beside the save button', async () => {
    stubFetch(caseRoutes());
    const { form } = await openCase();
    const save = within(form).getByRole('button', { name: /Save and close the case/ });
    const caution = within(form).getByRole('complementary', { name: 'About the score' });
    expect(caution).toHaveTextContent(/The score is evidence, not a verdict/);
    expect(caution.parentElement).toBe(save.parentElement);
  });

  it('on 409 stale_case says the case changed, refreshes it, and keeps what was typed', async () => {
    let version = 3;
    const api = stubFetch(
      caseRoutes({
        'GET /api/cases/7': () => ({ status: 200, body: caseDetail(7, { case: { version } }) }),
        'POST /api/cases/7/disposition': () => {
          version = 5;
          return { status: 409, body: { error: { code: 'stale_case', message: 'The case changed.' } } };
        },
      }),
    );
    const { user, form } = await openCase();
    const f = within(form);
    await user.keyboard('3');
    await user.type(f.getByLabelText(/Reason/), 'Waiting for the merchant to answer.');
    await user.click(f.getByRole('button', { name: /Save and close the case/ }));

    expect(await f.findByRole('alert')).toHaveTextContent('Someone changed this case after you opened it.');
    expect(f.getByLabelText(/Reason/)).toHaveValue('Waiting for the merchant to answer.');
    await waitFor(() => expect(api.callsTo('GET', '/api/cases/7').length).toBeGreaterThan(1));

    await user.click(f.getByRole('button', { name: /Save and close the case/ }));
    await waitFor(() => expect(api.callsTo('POST', '/api/cases/7/disposition')).toHaveLength(2));
    expect((api.callsTo('POST', '/api/cases/7/disposition')[1].body as { version: number }).version).toBe(5);
  });

  it('refuses amounts with more decimals than the currency has', async () => {
    const api = stubFetch(caseRoutes());
    const { user, form } = await openCase();
    const f = within(form);
    await user.keyboard('2');
    await user.type(f.getByLabelText(/Reason/), 'Cardholder confirmed the purchase.');
    await user.type(f.getByLabelText(/Amount recovered/), '10.125');
    await user.click(f.getByRole('button', { name: /Save and close the case/ }));
    expect(await f.findByText('EUR has 2 decimals at most.')).toBeInTheDocument();
    expect(api.callsTo('POST', '/api/cases/7/disposition')).toHaveLength(0);
  });
});
