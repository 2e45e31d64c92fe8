import {
  flexRender,
  getCoreRowModel,
  useReactTable,
  type ColumnDef,
  type OnChangeFn,
  type SortingState,
  type VisibilityState,
} from '@tanstack/react-table';
import { useLayoutEffect, useRef, type RefObject } from 'react';
import type { CaseSummary } from '@shared/api/cases';
import { CASE_STATUS_LABELS } from '@shared/api/cases';
import { cn } from '@/lib/cn';
import { formatProbability } from '@/lib/format';
import { riskLevel } from '@/lib/risk';
import { RIGHT_ALIGNED_COLUMNS, SORT_KEY_OF_COLUMN } from './queue-columns';

export type QueueTableProps = {
  cases: CaseSummary[];
  // TanStack's column value types differ per column; the table only renders them.
  // eslint-disable-next-line @typescript-eslint/no-explicit-any
  columns: ColumnDef<CaseSummary, any>[];
  sorting: SortingState;
  onSortingChange: OnChangeFn<SortingState>;
  columnVisibility: VisibilityState;
  pageIndex: number;
  pageSize: number;
  pageCount: number;
  cursorId: number | null;
  fresh: ReadonlySet<number>;
  /** Bumped by the screen when focus should follow the cursor (a key moved it). */
  focusToken: number;
  /** Rows the person asked to see (new arrivals): scrolled into view once, focus stays put. */
  reveal: { id: number; token: number } | null;
  onCursor: (id: number) => void;
  onOpen: (id: number) => void;
  /** Tells the screen whether keyboard focus is inside the list (Enter and arrows work only there). */
  onFocusWithin: (inside: boolean) => void;
  scrollRef: RefObject<HTMLDivElement | null>;
  busy: boolean;
};

function SortMark({ direction }: { direction: false | 'asc' | 'desc' }) {
  if (!direction) {
    return (
      <svg aria-hidden="true" viewBox="0 0 10 12" className="h-3 w-2.5 fill-current opacity-40">
        <path d="M5 1 8.5 5h-7L5 1Zm0 10L1.5 7h7L5 11Z" />
      </svg>
    );
  }
  return (
    <svg aria-hidden="true" viewBox="0 0 10 12" className="h-3 w-2.5 fill-current">
      {direction === 'asc' ? <path d="M5 1 9 7H1L5 1Z" /> : <path d="M5 11 1 5h8L5 11Z" />}
    </svg>
  );
}

function rowLabel(c: CaseSummary): string {
  const who = c.assignee ? `assigned to ${c.assignee.displayName}` : 'unassigned';
  const team = c.team ? `, team ${c.team.name}` : '';
  return `Case ${c.id}, ${formatProbability(c.probability)} ${riskLevel(c.probability).word}, ${CASE_STATUS_LABELS[c.status] ?? c.status}, ${who}${team}`;
}

/**
 * The queue's rows. Sorting, filtering and paging happen on the server; the
 * table only renders one page. One row at a time is in the tab order (the
 * cursor), so Tab moves past the list and j/k move within it.
 */
export function QueueTable(props: QueueTableProps) {
  const { cases, cursorId, fresh, focusToken, reveal, scrollRef } = props;
  const rowRefs = useRef(new Map<number, HTMLTableRowElement>());
  const anchor = useRef<{ id: number; top: number } | null>(null);

  const table = useReactTable({
    data: cases,
    columns: props.columns,
    getCoreRowModel: getCoreRowModel(),
    getRowId: (c) => String(c.id),
    manualSorting: true,
    manualFiltering: true,
    manualPagination: true,
    enableMultiSort: false,
    enableSortingRemoval: false,
    sortDescFirst: true,
    pageCount: props.pageCount,
    state: {
      sorting: props.sorting,
      columnVisibility: props.columnVisibility,
      pagination: { pageIndex: props.pageIndex, pageSize: props.pageSize },
    },
    onSortingChange: props.onSortingChange,
  });

  // Focus follows the cursor only when a key moved it, never on a refetch.
  useLayoutEffect(() => {
    if (focusToken === 0 || cursorId === null) return;
    const row = rowRefs.current.get(cursorId);
    if (!row) return;
    row.focus({ preventScroll: true });
    row.scrollIntoView?.({ block: 'nearest' });
  }, [focusToken, cursorId]);

  // A new cursor row is the new scroll anchor.
  useLayoutEffect(() => {
    const row = cursorId === null ? undefined : rowRefs.current.get(cursorId);
    anchor.current = row && cursorId !== null ? { id: cursorId, top: row.getBoundingClientRect().top } : null;
  }, [cursorId]);

  // When rows change around the cursor, scroll by as much as they pushed it, so it stays put on screen.
  useLayoutEffect(() => {
    const container = scrollRef.current;
    const held = anchor.current;
    if (!container || !held) return;
    const row = rowRefs.current.get(held.id);
    if (!row) {
      anchor.current = null;
      return;
    }
    const shift = row.getBoundingClientRect().top - held.top;
    if (shift !== 0) container.scrollTop += shift;
    anchor.current = { id: held.id, top: row.getBoundingClientRect().top };
  }, [cases, scrollRef]);

  // Asked-for arrivals are the one case where the list may scroll: the person pressed n to see them.
  useLayoutEffect(() => {
    const container = scrollRef.current;
    const target = reveal ? rowRefs.current.get(reveal.id) : undefined;
    if (!container || !target) return;
    // Up to the first new row, clear of the sticky header; never down, the cursor row is below it.
    const headerHeight = container.querySelector('thead')?.getBoundingClientRect().height ?? 0;
    container.scrollTop = Math.min(container.scrollTop, Math.max(0, target.offsetTop - headerHeight));
    const held = anchor.current;
    const row = held ? rowRefs.current.get(held.id) : undefined;
    if (held && row) anchor.current = { id: held.id, top: row.getBoundingClientRect().top };
  }, [reveal, scrollRef]);

  const onScroll = () => {
    const held = anchor.current;
    const row = held ? rowRefs.current.get(held.id) : undefined;
    if (held && row) anchor.current = { id: held.id, top: row.getBoundingClientRect().top };
  };

  const tabStop = cursorId !== null && cases.some((c) => c.id === cursorId) ? cursorId : cases[0]?.id;
  const visibleColumnCount = table.getVisibleLeafColumns().length;

  return (
    <div
      ref={scrollRef}
      onScroll={onScroll}
      onFocus={() => props.onFocusWithin(true)}
      onBlur={(event) => {
        if (!event.currentTarget.contains(event.relatedTarget as Node | null)) props.onFocusWithin(false);
      }}
      className="max-h-[68vh] min-h-40 overflow-auto rounded border border-border bg-surface"
    >
      <table className="w-full border-separate border-spacing-0 text-[0.8125rem]" aria-busy={props.busy || undefined}>
        <caption className="sr-only">
          Cases in the queue. Use j and k or the arrow keys to move, Enter or o to open, c to claim.
        </caption>
        <thead className="sticky top-0 z-10 bg-raised">
          {table.getHeaderGroups().map((group) => (
            <tr key={group.id}>
              {group.headers.map((header) => {
                const sortable = Boolean(SORT_KEY_OF_COLUMN[header.column.id]);
                const direction = header.column.getIsSorted();
                const label = flexRender(header.column.columnDef.header, header.getContext());
                return (
                  <th
                    key={header.id}
                    scope="col"
                    aria-sort={direction === 'asc' ? 'ascending' : direction === 'desc' ? 'descending' : undefined}
                    className={cn(
                      'border-b border-border px-1.5 py-1.5 text-left text-xs font-medium whitespace-nowrap text-muted',
                      RIGHT_ALIGNED_COLUMNS.has(header.column.id) && 'text-right',
                    )}
                  >
                    {sortable ? (
                      <button
                        type="button"
                        onClick={header.column.getToggleSortingHandler()}
                        className={cn('inline-flex items-center gap-1 rounded hover:text-text', direction && 'text-text')}
                      >
                        {label}
                        <SortMark direction={direction} />
                      </button>
                    ) : (
                      label
                    )}
                  </th>
                );
              })}
            </tr>
          ))}
        </thead>
        <tbody>
          {table.getRowModel().rows.map((row) => {
            const id = row.original.id;
            const isCursor = id === cursorId;
            return (
              <tr
                key={row.id}
                ref={(el) => {
                  if (el) rowRefs.current.set(id, el);
                  else rowRefs.current.delete(id);
                }}
                tabIndex={id === tabStop ? 0 : -1}
                aria-current={isCursor || undefined}
                aria-label={rowLabel(row.original)}
                data-case-id={id}
                data-arrival={fresh.has(id) ? 'new' : undefined}
                onClick={() => props.onCursor(id)}
                onDoubleClick={() => props.onOpen(id)}
                onFocus={(event) => {
                  if (event.target === event.currentTarget && !isCursor) props.onCursor(id);
                }}
                className={cn(
                  'cursor-default outline-none focus-visible:outline-2 focus-visible:-outline-offset-2 focus-visible:outline-focus',
                  isCursor ? 'bg-raised shadow-[inset_3px_0_0_var(--ec-brand)]' : 'hover:bg-raised/60',
                  fresh.has(id) && 'motion-safe:transition-opacity motion-safe:duration-700 motion-safe:starting:opacity-0',
                )}
              >
                {row.getVisibleCells().map((cell) => (
                  <td
                    key={cell.id}
                    className={cn(
                      'border-b border-border px-1.5 py-1 align-middle',
                      RIGHT_ALIGNED_COLUMNS.has(cell.column.id) && 'text-right',
                    )}
                  >
                    {flexRender(cell.column.columnDef.cell, cell.getContext())}
                  </td>
                ))}
              </tr>
            );
          })}
          {cases.length === 0 && (
            <tr>
              <td colSpan={visibleColumnCount} className="px-3 py-6 text-center text-sm text-muted">
                No cases match this view.
              </td>
            </tr>
          )}
        </tbody>
      </table>
    </div>
  );
}
