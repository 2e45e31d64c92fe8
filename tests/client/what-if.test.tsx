import { QueryClientProvider } from '@tanstack/react-query';
import { configure, render, screen, within } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import { describe, expect, it } from 'vitest';
import { explainRow, scoreRow, serializeModel, type Model } from '@shared/model/index';
import { WhatIfPanel } from '@/features/case-file/components/what-if-panel';
import { formatProbability } from '@/lib/format';
import { createQueryClient } from '@/lib/query-client';
import { alertDetail } from './support/alert-fixture';
import { stubFetch } from './support/fetch-stub';
import { smallModel } from './support/small-model';

// These tests load lazy screens and type whole sentences; a busy machine needs more than the default second.
configure({ asyncUtilTimeout: 4000 });

/** formatProbability puts no-break spaces around the sign; the text matcher sees plain ones. */
const pct = (p: number) => formatProbability(p).replace(/\u00A0/g, ' ');

function renderPanel(model: Model) {
  stubFetch({ 'GET /api/models/5/scoring-model': { status: 200, body: { model: JSON.parse(serializeModel(model)) } } });
  const queryClient = createQueryClient();
  render(
    <QueryClientProvider client={queryClient}>
      <WhatIfPanel alert={alertDetail({ features: { amount: 120, channel: 'pos' } })} />
    </QueryClientProvider>,
  );
  return userEvent.setup();
}

describe('What-if panel', () => {
  it('recomputes the probability in the browser when the amount changes, agreeing with scoreRow', async () => {
    const model = smallModel();
    const original = { amount: 120, channel: 'pos' };
    const edited = { amount: 950, channel: 'pos' };
    const before = scoreRow(model, original);
    const after = scoreRow(model, edited);
    // The fixture must make the edit matter, or the test would prove nothing.
    expect(formatProbability(after.probability)).not.toBe(formatProbability(before.probability));

    const user = renderPanel(model);
    const amount = await screen.findByLabelText('amount');
    const result = screen.getByRole('status', { name: 'What-if result' });
    expect(within(result).getByLabelText('Scored probability')).toHaveTextContent(pct(before.probability));
    expect(within(result).getByLabelText('What-if probability')).toHaveTextContent(pct(before.probability));

    await user.clear(amount);
    await user.type(amount, '950');
    expect(within(result).getByLabelText('What-if probability')).toHaveTextContent(pct(after.probability));
    expect(within(result).getByLabelText('Scored probability')).toHaveTextContent(pct(before.probability));
    expect(result).toHaveTextContent('What-if (1 change)');
    const points = (after.probability - before.probability) * 100;
    expect(result).toHaveTextContent(`${points >= 0 ? '+' : '−'}${Math.abs(points).toFixed(1)} points`);

    // The reasons table shows the explanation of the edited row.
    const amountReason = explainRow(model, edited).contributions.find((c) => c.feature === 'amount')!;
    expect(screen.getByRole('cell', { name: amountReason.text })).toBeInTheDocument();

    await user.click(screen.getByRole('button', { name: 'Reset all' }));
    expect(within(result).getByLabelText('What-if probability')).toHaveTextContent(pct(before.probability));
  });

  it('treats a cleared numeric field as missing, as the model does', async () => {
    const model = smallModel();
    const missing = scoreRow(model, { amount: null, channel: 'pos' });
    const user = renderPanel(model);
    const amount = await screen.findByLabelText('amount');
    await user.clear(amount);
    const result = screen.getByRole('status', { name: 'What-if result' });
    expect(within(result).getByLabelText('What-if probability')).toHaveTextContent(pct(missing.probability));
  });

  it('says so when the model cannot be loaded', async () => {
    stubFetch({ 'GET /api/models/5/scoring-model': { status: 404, body: { error: { code: 'not_found', message: 'No such model version.' } } } });
    render(
      <QueryClientProvider client={createQueryClient()}>
        <WhatIfPanel alert={alertDetail()} />
      </QueryClientProvider>,
    );
    expect(await screen.findByRole('alert')).toHaveTextContent('No such model version.');
  });
});
