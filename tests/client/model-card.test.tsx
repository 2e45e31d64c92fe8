import { render, screen, within } from '@testing-library/react';
import { QueryClientProvider } from '@tanstack/react-query';
import { MemoryRouter } from 'react-router';
import { describe, expect, it } from 'vitest';
import { MODEL_CARD_CAUTIONS, type ModelVersionDetail } from '@shared/api/models';
import { createQueryClient } from '@/lib/query-client';
import { ModelCard } from '@/features/models/components/model-card';
import { stubFetch } from './support/fetch-stub';

/** A version as GET /api/models/:id returns it (invented figures; the card only lays them out). */
function version(over: Partial<ModelVersionDetail> = {}): ModelVersionDetail {
  return {
    id: 7,
    label: 'v7-nightly',
    role: 'champion',
    createdAt: '2026-03-01T02:00:00.000Z',
    promotedAt: '2026-03-03T09:30:00.000Z',
    createdBy: null,
    dataFrom: '2026-01-01T00:00:00.000Z',
    dataTo: '2026-02-10T00:00:00.000Z',
    trainRows: 1000,
    counts: { rows: 2000, fraud: 40, labelled: 300, presumedLegitimate: 1700, train: 1000, validation: 500, test: 500 },
    headline: { rocAuc: 0.9, averagePrecision: 0.6, brier: 0.02, precisionAtBudget: 0.4, recallAtBudget: 0.6 },
    trainingSeconds: 12,
    rounds: 120,
    notes: null,
    params: { labelDelayDays: 30 },
    evaluation: null,
    curves: null,
    roundTable: [],
    importance: [{ feature: 'amount', importance: 1.2, share: 0.5, stumps: 30 }],
    stepFunctions: [],
    calibration: { a: -1.5, b: 0.25, n: 500, positives: 10 },
    windows: null,
    training: { roundsRun: 130, bestRound: 120, stoppedBy: 'early stopping', nTrain: 1000, nTrainPositive: 20, nValidation: 500, nValidationPositive: 10, shrinkage: 0.5, maxRounds: 200 },
    features: [{ name: 'amount', kind: 'numeric' }],
    hasDriftBaseline: true,
    ...over,
  } as ModelVersionDetail;
}

function renderCard(v: ModelVersionDetail) {
  stubFetch({ [`GET /api/models/${v.id}`]: { status: 200, body: { version: v } } });
  render(
    <QueryClientProvider client={createQueryClient()}>
      <MemoryRouter>
        <ModelCard id={v.id} />
      </MemoryRouter>
    </QueryClientProvider>,
  );
}

describe('model card', () => {
  it('has its five parts, each a region named by its heading, and every caution, the score-as-evidence one first', async () => {
    renderCard(version());
    expect(await screen.findByRole('heading', { level: 1, name: 'Fraud score v7-nightly' })).toBeInTheDocument();
    const names = ['Purpose', 'Data', 'How it did on newer held-out rows', 'Known limits', 'Cautions'];
    for (const name of names) expect(screen.getByRole('region', { name })).toBeInTheDocument();
    const cautions = within(screen.getByRole('region', { name: 'Cautions' })).getAllByRole('listitem').map((li) => li.textContent);
    expect(cautions).toEqual(MODEL_CARD_CAUTIONS);
    expect(cautions[0]).toMatch(/evidence, not a verdict/);
    // The method line names the kept rounds, the shrinkage and the fitted calibration.
    expect(within(screen.getByRole('region', { name: 'Purpose' })).getByText(/120 boosted decision stumps/)).toHaveTextContent('a = -1.5');
  });

  it('says so when no evaluation was stored, instead of a table of dashes', async () => {
    renderCard(version());
    const metrics = await screen.findByRole('region', { name: 'How it did on newer held-out rows' });
    expect(within(metrics).getByText('No evaluation was stored with this version.')).toBeInTheDocument();
    expect(within(metrics).queryByRole('table')).not.toBeInTheDocument();
  });
});
