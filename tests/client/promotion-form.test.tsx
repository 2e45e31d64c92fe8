import { render, screen, waitFor, within } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import { QueryClientProvider } from '@tanstack/react-query';
import { MemoryRouter } from 'react-router';
import { describe, expect, it } from 'vitest';
import type { ModelVersionSummary, PromotionRequest } from '@shared/api/models';
import { createQueryClient } from '@/lib/query-client';
import { HotkeysProvider } from '@/lib/hotkeys';
import { PromotionForm } from '@/features/models/components/promotion-form';
import { signedInRoutes, stubFetch, CSRF } from './support/fetch-stub';

const version = (id: number, label: string, role: ModelVersionSummary['role'], ap: number): ModelVersionSummary => ({
  id,
  label,
  role,
  createdAt: '2026-03-01T02:00:00.000Z',
  promotedAt: null,
  createdBy: null,
  dataFrom: '2026-01-01T00:00:00.000Z',
  dataTo: '2026-02-10T00:00:00.000Z',
  trainRows: 1000,
  counts: null,
  headline: { rocAuc: 0.9, averagePrecision: ap, brier: 0.02, precisionAtBudget: 0.4, recallAtBudget: 0.6 },
  trainingSeconds: 12,
  rounds: 120,
  notes: null,
});

const versions = [version(3, 'v3-night', 'challenger', 0.71), version(2, 'v2', 'champion', 0.64), version(1, 'v1', 'retired', 0.58)];

const filed = (over: Partial<PromotionRequest> = {}): PromotionRequest => ({
  id: 5,
  kind: 'promote',
  status: 'pending',
  modelVersion: { id: 3, label: 'v3-night' },
  fromChampion: { id: 2, label: 'v2' },
  reason: 'x',
  requestedBy: { id: 3, displayName: 'Dara Quill' },
  requestedAt: '2026-03-02T09:00:00.000Z',
  decidedBy: null,
  decidedAt: null,
  decisionNote: null,
  ...over,
});

const REASON = 'PR AUC 0.71 against 0.64 on the same four weeks, with 12 % fewer alerts at the current threshold.';

function renderForm(routes: Parameters<typeof stubFetch>[0], initialVersionId?: number) {
  const fetchStub = stubFetch({ ...signedInRoutes('data_scientist'), ...routes });
  render(
    <QueryClientProvider client={createQueryClient()}>
      <MemoryRouter>
        <HotkeysProvider>
          <PromotionForm versions={versions} championId={2} initialVersionId={initialVersionId} />
        </HotkeysProvider>
      </MemoryRouter>
    </QueryClientProvider>,
  );
  return { fetchStub, user: userEvent.setup() };
}

describe('promotion form', () => {
  it('offers every version but the champion, and files nothing without a version and a written reason', async () => {
    const { fetchStub, user } = renderForm({});
    const select = screen.getByLabelText('Version to make champion');
    const options = within(select).getAllByRole('option').map((o) => o.textContent ?? '');
    expect(options.some((o) => o.startsWith('v2 '))).toBe(false);
    expect(options.filter((o) => o.startsWith('v3-night') || o.startsWith('v1 '))).toHaveLength(2);

    await user.click(screen.getByRole('button', { name: 'Ask to promote' }));
    expect(await screen.findByText('Choose the version to make champion')).toBeInTheDocument();
    expect(screen.getByLabelText('Reason')).toHaveAttribute('aria-invalid', 'true');

    await user.selectOptions(select, '3');
    await user.type(screen.getByLabelText('Reason'), 'looks better');
    await user.click(screen.getByRole('button', { name: 'Ask to promote' }));
    expect(await screen.findByText(/20 characters at least/)).toBeInTheDocument();
    expect(fetchStub.callsTo('POST', '/api/promotions')).toHaveLength(0);
  });

  it('files the request with the reason and says it waits for a supervisor', async () => {
    const { fetchStub, user } = renderForm({ 'POST /api/promotions': { status: 201, body: { request: filed() } } }, 3);
    expect(screen.getByTestId('promotion-kind')).toHaveTextContent('Promotion: v3-night replaces the champion.');
    await user.type(screen.getByLabelText('Reason'), REASON);
    await user.click(screen.getByRole('button', { name: 'Ask to promote' }));
    expect(await screen.findByRole('status')).toHaveTextContent('Request #5 filed: promote v3-night. It takes effect when a supervisor approves it.');
    const [call] = fetchStub.callsTo('POST', '/api/promotions');
    expect(call.body).toEqual({ modelVersionId: 3, reason: REASON });
    expect(call.headers['x-csrf-token']).toBe(CSRF);
  });

  it('names a rollback when the chosen version was champion before; Ctrl+Enter files it', async () => {
    const { fetchStub, user } = renderForm({
      'POST /api/promotions': { status: 201, body: { request: filed({ id: 6, kind: 'rollback', modelVersion: { id: 1, label: 'v1' } }) } },
    });
    await user.selectOptions(screen.getByLabelText('Version to make champion'), '1');
    expect(screen.getByTestId('promotion-kind')).toHaveTextContent('Rollback: v1 was champion before and comes back.');
    expect(screen.getByRole('button', { name: 'Ask to roll back' })).toBeInTheDocument();
    await user.type(screen.getByLabelText('Reason'), 'Alert volume doubled after the last promotion; going back to v1.');
    await user.keyboard('{Control>}{Enter}{/Control}');
    await waitFor(() => expect(fetchStub.callsTo('POST', '/api/promotions')).toHaveLength(1));
    expect(fetchStub.callsTo('POST', '/api/promotions')[0].body).toMatchObject({ modelVersionId: 1 });
    expect(await screen.findByRole('status')).toHaveTextContent('roll back to v1');
  });

  it('shows the server’s answer when it refuses', async () => {
    const { user } = renderForm(
      { 'POST /api/promotions': { status: 409, body: { error: { code: 'request_pending', message: 'A request for v3-night is already waiting for approval (#4).' } } } },
      3,
    );
    await user.type(screen.getByLabelText('Reason'), REASON);
    await user.click(screen.getByRole('button', { name: 'Ask to promote' }));
    expect(await screen.findByRole('alert')).toHaveTextContent('already waiting for approval (#4)');
  });
});
