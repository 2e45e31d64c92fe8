import { act, render, screen, waitFor, within } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import { QueryClientProvider } from '@tanstack/react-query';
import { MemoryRouter } from 'react-router';
import { describe, expect, it, vi } from 'vitest';
import { TRAINING_PROGRESS_EVENT, type TrainingProgressEvent, type TrainingRun } from '@shared/api/models';
import { createQueryClient } from '@/lib/query-client';
import { HotkeysProvider } from '@/lib/hotkeys';
import { SocketProvider } from '@/lib/socket';
import { TrainingProgress } from '@/features/models/components/training-progress';
import { currentSocket } from './support/fake-socket';
import { signedInRoutes, stubFetch } from './support/fetch-stub';

// recharts measures its container; jsdom has no layout, so give it a fixed box.
class FixedResizeObserver {
  constructor(private readonly cb: ResizeObserverCallback) {}
  observe(el: Element) {
    this.cb([{ target: el, contentRect: { width: 600, height: 220 } } as unknown as ResizeObserverEntry], this as unknown as ResizeObserver);
  }
  unobserve() {}
  disconnect() {}
}

const run = (over: Partial<TrainingRun> = {}): TrainingRun => ({
  id: 7,
  status: 'running',
  trigger: 'manual',
  requestedBy: { id: 3, displayName: 'Dara Quill' },
  params: { from: '2026-01-01T00:00:00.000Z', to: '2026-03-01T00:00:00.000Z', rounds: 200, labelDelayDays: 21, shrinkage: 0.5, label: null, notes: null },
  progress: { round: 0, totalRounds: 200, trainLoss: null, validationLoss: null, phase: 'reading labelled transactions' },
  curve: [],
  modelVersionId: null,
  modelVersionLabel: null,
  error: null,
  cancelRequested: false,
  createdAt: '2026-03-02T10:00:00.000Z',
  startedAt: '2026-03-02T10:00:01.000Z',
  finishedAt: null,
  ...over,
});

const event = (over: Partial<TrainingProgressEvent>): TrainingProgressEvent => ({
  runId: 7,
  status: 'running',
  round: 0,
  totalRounds: 200,
  trainLoss: null,
  validationLoss: null,
  phase: 'boosting',
  points: [],
  modelVersionId: null,
  error: null,
  at: new Date().toISOString(),
  ...over,
});

const points = (from: number, to: number) =>
  Array.from({ length: to - from + 1 }, (_, i) => ({ round: from + i, trainLoss: 1 - (from + i) / 1000, validationLoss: 1 - (from + i) / 1200 }));

function renderProgress(routes: Parameters<typeof stubFetch>[0]) {
  vi.stubGlobal('ResizeObserver', FixedResizeObserver);
  const fetchStub = stubFetch({ ...signedInRoutes('data_scientist'), ...routes });
  const queryClient = createQueryClient();
  render(
    <QueryClientProvider client={queryClient}>
      <MemoryRouter>
        <SocketProvider onSessionEnded={() => {}}>
          <HotkeysProvider>
            <TrainingProgress runId={7} canCancel />
          </HotkeysProvider>
        </SocketProvider>
      </MemoryRouter>
    </QueryClientProvider>,
  );
  return { fetchStub, user: userEvent.setup() };
}

describe('training progress view', () => {
  it('shows round k of T, both losses, the bar and the curve as progress events arrive', async () => {
    renderProgress({ 'GET /api/training/runs/7': { status: 200, body: { run: run() } } });
    expect(await screen.findByText(/waiting|reading labelled transactions/i)).toBeInTheDocument();
    const socket = currentSocket();

    act(() => socket.serverEmit(TRAINING_PROGRESS_EVENT, event({ round: 12, trainLoss: 0.41234, validationLoss: 0.45678, points: points(1, 12) })));
    // The query cache tells its observers on the next tick: wait for the screen to follow.
    expect(await screen.findByText('Round 12 of 200')).toBeInTheDocument();
    expect(screen.getByTestId('train-loss')).toHaveTextContent('0.4123');
    expect(screen.getByTestId('validation-loss')).toHaveTextContent('0.4568');
    const bar = screen.getByRole('progressbar', { name: 'Boosting rounds done' });
    expect(bar).toHaveAttribute('aria-valuenow', '12');
    expect(bar).toHaveAttribute('aria-valuemax', '200');

    // Another run's events do not touch this one; a repeated point is not drawn twice.
    act(() => socket.serverEmit(TRAINING_PROGRESS_EVENT, event({ runId: 8, round: 99, points: points(1, 99) })));
    act(() => socket.serverEmit(TRAINING_PROGRESS_EVENT, event({ round: 30, trainLoss: 0.3, validationLoss: 0.35, points: points(12, 30) })));
    expect(await screen.findByText('Round 30 of 200')).toBeInTheDocument();
    const figure = screen.getByRole('figure', { name: /loss so far/i });
    const table = within(figure).getByRole('table', { hidden: true });
    const rounds = within(table)
      .getAllByRole('row', { hidden: true })
      .slice(1)
      .map((r) => Number(within(r).getAllByRole('cell', { hidden: true })[0].textContent));
    expect(rounds).toEqual(Array.from({ length: 30 }, (_, i) => i + 1));
  });

  it('cancels the run, then shows it stopped with nothing registered', async () => {
    const { fetchStub, user } = renderProgress({
      'GET /api/training/runs/7': { status: 200, body: { run: run({ progress: { round: 5, totalRounds: 200, trainLoss: 0.5, validationLoss: 0.6, phase: 'boosting' }, curve: points(1, 5) }) } },
      'POST /api/training/runs/7/cancel': { status: 200, body: { run: run({ cancelRequested: true, progress: { round: 6, totalRounds: 200, trainLoss: 0.5, validationLoss: 0.6, phase: 'boosting' } }) } },
    });
    await user.click(await screen.findByRole('button', { name: 'Cancel run' }));
    await waitFor(() => expect(fetchStub.callsTo('POST', '/api/training/runs/7/cancel')).toHaveLength(1));
    expect(fetchStub.callsTo('POST', '/api/training/runs/7/cancel')[0].headers['x-csrf-token']).toBeTruthy();
    expect(await screen.findByText(/stopping after this round/)).toBeInTheDocument();
    expect(screen.getByRole('button', { name: 'Cancelling…' })).toBeDisabled();

    act(() => currentSocket().serverEmit(TRAINING_PROGRESS_EVENT, event({ status: 'cancelled', round: 7, phase: 'cancelled', points: points(6, 7) })));
    expect(await screen.findByText('Cancelled at round 7 of 200; nothing was registered.')).toBeInTheDocument();
    expect(screen.queryByRole('button', { name: /cancel/i })).not.toBeInTheDocument();
  });

  it('links to the new challenger when the run finishes early', async () => {
    renderProgress({ 'GET /api/training/runs/7': { status: 200, body: { run: run() } } });
    await screen.findByText(/reading labelled transactions/);
    act(() =>
      currentSocket().serverEmit(
        TRAINING_PROGRESS_EVENT,
        event({ status: 'completed', round: 140, phase: 'registered as challenger', modelVersionId: 42, points: points(1, 140) }),
      ),
    );
    expect(await screen.findByText(/Finished after 140 of 200 rounds \(validation loss stopped improving\)/)).toBeInTheDocument();
    expect(screen.getByRole('link', { name: /now the challenger/ })).toHaveAttribute('href', '/models/versions/42');
  });
});
