import { useState } from 'react';
import { useSearchParams } from 'react-router';
import { Button } from '@/components/ui/button';
import { KeyHint } from '@/components/ui/key-hint';
import { PanelBoundary } from '@/components/ui/panel-boundary';
import { NowPanel, ScreenHeader } from '@/components/ui/screen-header';
import { LoadingLine } from '@/components/ui/spinner';
import { cn } from '@/lib/cn';
import { useHotkey } from '@/lib/hotkeys';
import { useApprovals } from '../api/get-approvals';
import { useBoard } from '../api/get-board';
import type { OpenCasesFilter } from '../api/get-open-cases';
import { BOARD_TABS, boardTabOf, type BoardTab } from '../utils/board-tabs';
import { useLiveBoard } from '../utils/use-live-board';
import { AlertVolumeChart } from './alert-volume-chart';
import { ApprovalsList } from './approvals-list';
import { OpenCasesTable } from './open-cases-table';
import { PolicyPanel } from './policy-panel';
import { QueueAgeChart } from './queue-age-chart';
import { RoutingPanel } from './routing-panel';
import { TeamTable } from './team-table';
import { ThresholdPanel } from './threshold-panel';

function TabKey({ tab, onPick }: { tab: (typeof BOARD_TABS)[number]; onPick: (t: BoardTab) => void }) {
  useHotkey(tab.key, () => onPick(tab.id), { description: `Board: ${tab.label}`, group: 'Board' });
  return null;
}

function Now() {
  const board = useBoard();
  const approvals = useApprovals('pending');
  if (!board.data) return <NowPanel>{board.isError ? `The board could not be loaded: ${board.error.message}` : 'Loading the team’s work…'}</NowPanel>;
  const b = board.data;
  const waiting = approvals.data?.length ?? b.totals.awaitingApproval;
  return (
    <NowPanel>
      <ul className="flex flex-wrap gap-x-6 gap-y-1">
        <li>
          <span className={cn('font-semibold tabular-nums', b.totals.slaBreaches > 0 && 'text-danger')}>{b.totals.slaBreaches}</span> open past their SLA
          {b.unassigned.slaBreaches > 0 && ` (${b.unassigned.slaBreaches} unassigned)`}
        </li>
        <li>
          <span className="font-semibold tabular-nums">{waiting}</span> {waiting === 1 ? 'decision waits' : 'decisions wait'} for approval
        </li>
        <li>
          <span className="font-semibold tabular-nums">{b.unassigned.open}</span> unassigned of {b.totals.open} open
        </li>
      </ul>
    </NowPanel>
  );
}

function TeamTab({ meId }: { meId: number }) {
  const board = useBoard();
  const [filter, setFilter] = useState<OpenCasesFilter>({ view: 'all', page: 1 });
  if (board.isPending) return <LoadingLine label="Loading the team’s work…" />;
  if (board.isError)
    return (
      <div role="alert" className="text-sm text-danger">
        The board could not be loaded: {board.error.message}{' '}
        <Button size="sm" onClick={() => void board.refetch()}>
          Try again
        </Button>
      </div>
    );
  const b = board.data;
  return (
    <div className="flex flex-col gap-4">
      <PanelBoundary title="Team">
        <TeamTable
          board={b}
          picked={filter.view === 'person' ? (filter.assignee ?? null) : null}
          onPick={(id) => setFilter(id === null ? { view: 'all', page: 1 } : { view: 'person', assignee: id, page: 1 })}
        />
      </PanelBoundary>
      <div className="grid grid-cols-1 gap-4 lg:grid-cols-2">
        <section aria-labelledby="age-heading" className="rounded border border-border bg-surface p-3">
          <h2 id="age-heading" className="mb-1 text-sm font-semibold text-text">
            Queue age
          </h2>
          <PanelBoundary title="Queue age">
            <QueueAgeChart buckets={b.queueAge} />
          </PanelBoundary>
        </section>
        <section aria-labelledby="volume-heading" className="rounded border border-border bg-surface p-3">
          <h2 id="volume-heading" className="mb-1 text-sm font-semibold text-text">
            Alert volume against capacity
          </h2>
          <PanelBoundary title="Alert volume">
            <AlertVolumeChart hours={b.alertVolume} perHour={b.capacity.perHour} />
          </PanelBoundary>
        </section>
      </div>
      <PanelBoundary title="Approvals">
        <ApprovalsList meId={meId} />
      </PanelBoundary>
      <PanelBoundary title="Open cases">
        <OpenCasesTable people={b.people} filter={filter} onFilter={setFilter} />
      </PanelBoundary>
    </div>
  );
}

/** The supervisor's Board: the team's work live, and the levers that shape it. */
export function BoardScreen({ meId }: { meId: number }) {
  useLiveBoard();
  const [params, setParams] = useSearchParams();
  const tab = boardTabOf(params.get('tab'));
  const pick = (t: BoardTab) => setParams(t === 'team' ? {} : { tab: t }, { replace: true });
  return (
    <div className="flex flex-col gap-4">
      <title>Board · Edgecase</title>
      <ScreenHeader title="Board">
        <Now />
      </ScreenHeader>
      {BOARD_TABS.map((t) => (
        <TabKey key={t.id} tab={t} onPick={pick} />
      ))}
      <nav aria-label="Board sections">
        <ul className="flex flex-wrap gap-1 border-b border-border">
          {BOARD_TABS.map((t) => (
            <li key={t.id}>
              <button
                type="button"
                aria-current={tab === t.id ? 'page' : undefined}
                onClick={() => pick(t.id)}
                className={cn(
                  '-mb-px inline-flex h-8 items-center gap-2 border-b-2 px-2 text-sm',
                  tab === t.id ? 'border-brand font-semibold text-text' : 'border-transparent text-muted hover:text-text',
                )}
              >
                {t.label}
                <KeyHint keys={t.key} />
              </button>
            </li>
          ))}
        </ul>
      </nav>
      {tab === 'team' && <TeamTab meId={meId} />}
      {tab === 'threshold' && (
        <PanelBoundary title="Alert threshold">
          <ThresholdPanel />
        </PanelBoundary>
      )}
      {tab === 'policy' && (
        <PanelBoundary title="SLA and approvals">
          <PolicyPanel />
        </PanelBoundary>
      )}
      {tab === 'routing' && (
        <PanelBoundary title="Routing">
          <RoutingPanel />
        </PanelBoundary>
      )}
    </div>
  );
}
