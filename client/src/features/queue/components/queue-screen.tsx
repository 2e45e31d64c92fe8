import { useQueryClient } from '@tanstack/react-query';
import type { SortingState, Updater } from '@tanstack/react-table';
import { useCallback, useEffect, useLayoutEffect, useMemo, useRef, useState } from 'react';
import { useLocation, useNavigate, useSearchParams } from 'react-router';
import { OPEN_STATUSES, type QueueAlertEvent, type SavedView } from '@shared/api/cases';
import { QUEUE_ALERT_EVENT, QUEUE_CASE_CHANGED_EVENT } from '@shared/api/realtime';
import { Button } from '@/components/ui/button';
import { CautionNote } from '@/components/ui/caution-note';
import { KeyHint } from '@/components/ui/key-hint';
import { PanelBoundary } from '@/components/ui/panel-boundary';
import { NowPanel, ScreenHeader } from '@/components/ui/screen-header';
import { claimConflictHolder, claimConflictMessage } from '@/lib/claim-conflict';
import { cn } from '@/lib/cn';
import { useHotkey } from '@/lib/hotkeys';
import { useSocket, useSocketEvent } from '@/lib/socket';
import { formatDateTime } from '@/lib/time';
import { useClaimCase } from '../api/claim-case';
import { queueListsKey, useQueue } from '../api/get-queue';
import { useSavedViews } from '../api/get-saved-views';
import { useSaveSavedViews } from '../api/save-saved-views';
import { reconcileLiveRows, revealHeld, settleFresh, startLiveRows, visibleCases, type LiveRows } from '../utils/live-rows';
import {
  changeQueueParams,
  DEFAULT_QUEUE_PARAMS,
  paramsOfSavedView,
  queueApiSearch,
  readQueueParams,
  writeQueueParams,
  type QueueParams,
  type QueueView,
} from '../utils/queue-search';
import { QueueClock } from './queue-clock';
import { DEFAULT_VISIBLE_COLUMNS, HIDEABLE_COLUMNS, queueColumns, SORT_KEY_OF_COLUMN } from './queue-columns';
import { QueueFilters } from './queue-filters';
import { QueuePagination } from './queue-pagination';
import { QueueTable } from './queue-table';
import { ColumnPicker, SavedViewsControl } from './saved-views';
import { ViewSwitcher } from './view-switcher';

const COLUMN_OF_SORT_KEY = Object.fromEntries(Object.entries(SORT_KEY_OF_COLUMN).map(([column, key]) => [key, column]));

type Notice = { tone: 'ok' | 'error'; text: string };

/** Counts for "what needs me now": open cases in this view past their SLA, or about to be. */
function useDeadlineCounts(view: QueueView) {
  const base = { ...DEFAULT_QUEUE_PARAMS, view, status: OPEN_STATUSES, pageSize: 1 };
  const breached = useQueue({ ...base, dueWithinMinutes: 0 });
  const dueSoon = useQueue({ ...base, dueWithinMinutes: 30 });
  return { breached: breached.data?.total, dueSoon: dueSoon.data?.total };
}

/** Refetch after the live connection comes back: events sent while it was down are lost. */
function useResyncOnReconnect(onResync: () => void) {
  const { status } = useSocket();
  const previous = useRef(status);
  useEffect(() => {
    const was = previous.current;
    previous.current = status;
    if (status === 'connected' && (was === 'reconnecting' || was === 'offline')) onResync();
  }, [status, onResync]);
}

export function QueueScreen({ meId }: { meId: number }) {
  const [search, setSearch] = useSearchParams();
  const navigate = useNavigate();
  // A line left by the Case file after a decision ("Case 7 saved as legitimate.").
  const flash = (useLocation().state as { flash?: string } | null)?.flash;
  const queryClient = useQueryClient();
  const params = useMemo(() => readQueueParams(search), [search]);
  const key = queueApiSearch(params);
  const queue = useQueue(params);
  const counts = useDeadlineCounts(params.view);
  const claim = useClaimCase();
  const savedViews = useSavedViews();
  const saveViews = useSaveSavedViews();

  const searchRef = useRef<HTMLInputElement>(null);
  const scrollRef = useRef<HTMLDivElement>(null);
  const listFocused = useRef(false);
  const [listHasFocus, setListHasFocus] = useState(false);
  const [cursorId, setCursorId] = useState<number | null>(null);
  const cursorIndex = useRef(0);
  const [focusToken, setFocusToken] = useState(0);
  const [notice, setNotice] = useState<Notice | null>(null);
  const [openedAt] = useState(() => new Date().toISOString());
  const [arrivals, setArrivals] = useState({ alerts: 0, newCases: 0 });
  const [columnChoice, setColumnChoice] = useState<string[] | null>(null);

  // Fold each newer server page into what is shown (during render, so a held row never flashes on screen).
  const [live, setLive] = useState<LiveRows>(() => startLiveRows(key, undefined));
  const settled = queue.data && !queue.isPlaceholderData ? queue.data : undefined;
  if (settled && (settled !== live.source || key !== live.key)) {
    setLive(reconcileLiveRows(live, key, settled, cursorId));
  }
  const cases = visibleCases(live);

  const refetchQueue = useCallback(() => {
    void queryClient.invalidateQueries({ queryKey: queueListsKey });
  }, [queryClient]);

  useSocketEvent<[QueueAlertEvent]>(QUEUE_ALERT_EVENT, (event) => {
    setArrivals((a) => ({ alerts: a.alerts + 1, newCases: a.newCases + (event?.created ? 1 : 0) }));
    refetchQueue();
  });
  useSocketEvent(QUEUE_CASE_CHANGED_EVENT, refetchQueue);
  useResyncOnReconnect(refetchQueue);

  // The cursor's case left the list (claimed elsewhere, closed): take its neighbour, and keep focus in the list.
  useEffect(() => {
    if (cursorId === null || cases.some((c) => c.id === cursorId)) return;
    const next = cases[Math.min(cursorIndex.current, cases.length - 1)];
    setCursorId(next?.id ?? null);
    if (listFocused.current && (document.activeElement === document.body || document.activeElement === null)) {
      setFocusToken((t) => t + 1);
    }
  }, [cases, cursorId]);

  // The router applies a new URL a moment later; changes made before it lands build on the last one asked for.
  const latestParams = useRef(params);
  useLayoutEffect(() => {
    latestParams.current = params;
  }, [params]);
  const setParams = (
    changes: Partial<QueueParams> | ((current: QueueParams) => Partial<QueueParams>),
    { push = false }: { push?: boolean } = {},
  ) => {
    const current = latestParams.current;
    const next = changeQueueParams(current, typeof changes === 'function' ? changes(current) : changes);
    latestParams.current = next;
    setSearch(writeQueueParams(next), { replace: !push });
  };

  const placeCursor = (id: number, { focus }: { focus: boolean }) => {
    setCursorId(id);
    cursorIndex.current = Math.max(0, cases.findIndex((c) => c.id === id));
    setLive((state) => settleFresh(state, id));
    if (focus) setFocusToken((t) => t + 1);
  };

  const move = (delta: number) => {
    if (cases.length === 0) return;
    const index = cases.findIndex((c) => c.id === cursorId);
    const nextIndex = index < 0 ? (delta > 0 ? 0 : cases.length - 1) : Math.max(0, Math.min(cases.length - 1, index + delta));
    placeCursor(cases[nextIndex].id, { focus: true });
  };

  const cursorCase = cases.find((c) => c.id === cursorId) ?? null;

  const open = (id: number | null | undefined) => {
    if (id == null) return;
    navigate(`/cases/${id}`, { state: { queueSearch: search.toString() } });
  };

  const claimCase = (id: number | null | undefined) => {
    if (id == null || claim.isPending) return;
    setNotice(null);
    claim.mutate(id, {
      onSuccess: () => setNotice({ tone: 'ok', text: `You hold case ${id} now. Press o to open it.` }),
      onError: (error) => {
        const holder = claimConflictHolder(error);
        setNotice({
          tone: 'error',
          text: holder === undefined ? `Case ${id} could not be claimed: ${error.message}` : `${claimConflictMessage(holder)} (case ${id}).`,
        });
      },
    });
  };

  const leaveFilters = () => {
    const target = cursorCase ?? cases[0];
    if (target) placeCursor(target.id, { focus: true });
    else if (document.activeElement instanceof HTMLElement) document.activeElement.blur();
  };

  const [revealed, setRevealed] = useState<{ id: number; token: number } | null>(null);
  const reveal = () => {
    const first = live.source?.items.find((c) => live.held.has(c.id));
    if (!first) return;
    setLive((state) => revealHeld(state));
    setRevealed((r) => ({ id: first.id, token: (r?.token ?? 0) + 1 }));
  };
  const setView = (view: QueueView) => setParams({ view }, { push: true });

  const group = 'Queue';
  useHotkey('j', () => move(1), { description: 'Next case', group });
  useHotkey('k', () => move(-1), { description: 'Previous case', group });
  useHotkey('ArrowDown', () => move(1), { description: 'Next case (in the list)', group, enabled: listHasFocus });
  useHotkey('ArrowUp', () => move(-1), { description: 'Previous case (in the list)', group, enabled: listHasFocus });
  useHotkey('o', () => open(cursorId), { description: 'Open the case under the cursor', group });
  useHotkey('Enter', () => open(cursorId), { description: 'Open the case under the cursor (in the list)', group, enabled: listHasFocus });
  useHotkey('c', () => claimCase(cursorId), { description: 'Claim the case under the cursor', group });
  useHotkey('n', reveal, { description: 'Show cases that arrived above the cursor', group });
  useHotkey('/', () => searchRef.current?.focus(), { description: 'Search by case id, BIN or last four', group });
  useHotkey('a', () => setView('all'), { description: 'View: All cases', group });
  useHotkey('m', () => setView('mine'), { description: 'View: Mine', group });
  useHotkey('u', () => setView('unassigned'), { description: 'View: Unassigned', group });

  const visibleColumns = columnChoice ?? savedViews.data?.columns ?? DEFAULT_VISIBLE_COLUMNS;
  const columnVisibility = Object.fromEntries(HIDEABLE_COLUMNS.map((c) => [c.id, visibleColumns.includes(c.id)]));
  const chooseColumns = (columns: string[]) => {
    setColumnChoice(columns);
    if (savedViews.data) saveViews.mutate({ ...savedViews.data, columns });
  };
  const applySavedView = (view: SavedView) => {
    if (view.columns) setColumnChoice(view.columns);
    setSearch(writeQueueParams(paramsOfSavedView(view.query)), { replace: false });
  };

  const columns = useMemo(() => queueColumns({ meId, fresh: live.fresh }), [meId, live.fresh]);
  const sorting: SortingState = [{ id: COLUMN_OF_SORT_KEY[params.sort] ?? 'priority', desc: params.order === 'desc' }];
  const onSortingChange = (updater: Updater<SortingState>) => {
    const next = typeof updater === 'function' ? updater(sorting) : updater;
    const sortKey = next[0] ? SORT_KEY_OF_COLUMN[next[0].id] : undefined;
    if (sortKey) setParams({ sort: sortKey, order: next[0].desc ? 'desc' : 'asc' });
  };

  const total = live.source?.total ?? 0;
  const held = live.held.size;

  return (
    <div className="flex flex-col gap-3">
      <title>Queue · Edgecase</title>
      <ScreenHeader title="Queue">
        <NowPanel>
          <ul className="flex flex-wrap gap-x-5 gap-y-1">
            <li>
              <span className="font-semibold tabular-nums">{live.source ? total.toLocaleString('en') : '…'}</span> cases match
              this view
            </li>
            <li>
              <button type="button" className="text-link underline-offset-2 hover:underline" onClick={() => setParams({ dueWithinMinutes: 0 })}>
                <span className="font-semibold tabular-nums">{counts.breached ?? '…'}</span> open past their SLA
              </button>
            </li>
            <li>
              <button type="button" className="text-link underline-offset-2 hover:underline" onClick={() => setParams({ dueWithinMinutes: 30 })}>
                <span className="font-semibold tabular-nums">{counts.dueSoon ?? '…'}</span> due within 30 min
              </button>
            </li>
            <li role="status" aria-live="polite">
              <span className="font-semibold tabular-nums">{arrivals.alerts}</span> alert{arrivals.alerts === 1 ? '' : 's'} arrived since you
              opened the Queue at {formatDateTime(openedAt)} ({arrivals.newCases} on new case{arrivals.newCases === 1 ? '' : 's'})
            </li>
          </ul>
        </NowPanel>
      </ScreenHeader>
      {flash && (
        <p role="status" className="text-sm text-text">
          {flash}
        </p>
      )}
      <CautionNote />

      <div className="flex flex-wrap items-end justify-between gap-3">
        <div className="flex flex-wrap items-end gap-3">
          <ViewSwitcher view={params.view} onChange={setView} />
          <PanelBoundary title="Saved views">
            <SavedViewsControl params={params} visibleColumns={visibleColumns} onApply={applySavedView} />
          </PanelBoundary>
        </div>
        <ColumnPicker visible={visibleColumns} onChange={chooseColumns} />
      </div>

      <QueueFilters
        ref={searchRef}
        params={params}
        onChange={(changes) => setParams(changes)}
        onClear={() => setParams({ q: undefined, status: undefined, priority: undefined, mcc: undefined, country: undefined, channel: undefined, assignee: undefined, minProbability: undefined, maxProbability: undefined, minAmount: undefined, dueWithinMinutes: undefined })}
        onLeave={leaveFilters}
      />

      <div className="flex min-h-8 flex-wrap items-center gap-3 text-xs">
        <span className="text-muted">
          {cursorCase ? (
            <>
              Cursor on case <span className="font-mono text-text">{cursorCase.id}</span>
            </>
          ) : (
            <>
              Press <KeyHint keys="j" /> to start at the top
            </>
          )}
        </span>
        <Button size="sm" onClick={() => open(cursorId)} disabled={!cursorCase}>
          Open <KeyHint keys="o" />
        </Button>
        <Button size="sm" onClick={() => claimCase(cursorId)} disabled={!cursorCase || claim.isPending}>
          {claim.isPending ? 'Claiming…' : 'Claim'} <KeyHint keys="c" />
        </Button>
        {held > 0 && (
          <Button size="sm" variant="primary" onClick={reveal}>
            {held} new case{held === 1 ? '' : 's'} arrived above — press n to show <KeyHint keys="n" className="[&_kbd]:text-text" />
          </Button>
        )}
        {queue.isFetching && live.source && <span className="text-muted">Refreshing…</span>}
        <p
          role={notice?.tone === 'error' ? 'alert' : 'status'}
          className={cn('ml-auto', notice?.tone === 'error' ? 'font-medium text-danger' : 'text-text')}
        >
          {notice?.text}
        </p>
      </div>

      {queue.isError && !live.source ? (
        <div role="alert" className="rounded border border-border bg-surface p-3 text-sm">
          <p className="font-medium text-text">The queue could not load.</p>
          <p className="mt-1 text-xs text-muted">{queue.error.message}</p>
          <Button size="sm" className="mt-2" onClick={() => void queue.refetch()}>
            Try again
          </Button>
        </div>
      ) : !live.source ? (
        <p role="status" className="text-sm text-muted">
          Loading the queue…
        </p>
      ) : (
        <QueueClock serverTime={live.source.serverTime} receivedAt={queue.dataUpdatedAt}>
          <QueueTable
            cases={cases}
            columns={columns}
            sorting={sorting}
            onSortingChange={onSortingChange}
            columnVisibility={columnVisibility}
            pageIndex={params.page - 1}
            pageSize={params.pageSize}
            pageCount={Math.max(1, Math.ceil(total / params.pageSize))}
            cursorId={cursorId}
            fresh={live.fresh}
            focusToken={focusToken}
            reveal={revealed}
            onCursor={(id) => placeCursor(id, { focus: false })}
            onOpen={open}
            onFocusWithin={(inside) => {
              listFocused.current = inside;
              setListHasFocus(inside);
            }}
            scrollRef={scrollRef}
            busy={queue.isFetching}
          />
        </QueueClock>
      )}

      {live.source && (
        <QueuePagination
          page={params.page}
          pageSize={params.pageSize}
          total={total}
          shown={cases.length}
          onPage={(page) => setParams({ page }, { push: true })}
          onPageSize={(pageSize) => setParams({ pageSize })}
        />
      )}
    </div>
  );
}
