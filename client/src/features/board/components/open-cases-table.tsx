import { createColumnHelper, flexRender, getCoreRowModel, useReactTable, type RowSelectionState } from '@tanstack/react-table';
import { useMemo, useState } from 'react';
import { Link } from 'react-router';
import { CASE_STATUS_LABELS, type CaseSummary } from '@shared/api/cases';
import type { BoardPerson } from '@shared/api/supervision';
import { Button } from '@/components/ui/button';
import { CardFragment } from '@/components/ui/card-fragment';
import { KeyHint } from '@/components/ui/key-hint';
import { LoadingLine } from '@/components/ui/spinner';
import { RiskBadge } from '@/components/ui/risk-badge';
import { SlaCountdown } from '@/components/ui/sla-countdown';
import { useHotkey } from '@/lib/hotkeys';
import { formatMoney } from '@/lib/money';
import { useServerNow } from '@/lib/time';
import { OPEN_CASES_PAGE_SIZE, useOpenCases, type OpenCasesFilter } from '../api/get-open-cases';
import { ReassignDialog } from './reassign-dialog';

const column = createColumnHelper<CaseSummary>();

function SlaCell({ dueAt, now }: { dueAt: string; now: number }) {
  return <SlaCountdown dueAt={dueAt} now={now} className="text-xs" />;
}

/**
 * The board's own table of open cases, soonest SLA deadline first. Tick rows
 * (or press a for the whole page) and hand them to one person in one go.
 */
export function OpenCasesTable({ people, filter, onFilter }: { people: BoardPerson[]; filter: OpenCasesFilter; onFilter: (f: OpenCasesFilter) => void }) {
  const query = useOpenCases(filter);
  const page = query.data;
  const now = useServerNow(page?.serverTime, query.dataUpdatedAt, 15_000);
  const [selection, setSelection] = useState<RowSelectionState>({});
  const [dialogOpen, setDialogOpen] = useState(false);
  const [done, setDone] = useState<string | null>(null);

  const columns = useMemo(
    () => [
      column.display({
        id: 'select',
        header: ({ table }) => (
          <input
            type="checkbox"
            aria-label="Select every case on this page"
            checked={table.getIsAllRowsSelected()}
            ref={(el) => {
              if (el) el.indeterminate = table.getIsSomeRowsSelected();
            }}
            onChange={table.getToggleAllRowsSelectedHandler()}
          />
        ),
        cell: ({ row }) => (
          <input type="checkbox" aria-label={`Select case ${row.original.id}`} checked={row.getIsSelected()} onChange={row.getToggleSelectedHandler()} />
        ),
      }),
      column.accessor('id', {
        header: 'Case',
        cell: (c) => (
          <Link to={`/cases/${c.getValue()}`} className="font-mono text-link underline-offset-2 hover:underline">
            #{c.getValue()}
          </Link>
        ),
      }),
      column.accessor('slaDueAt', { header: 'SLA', cell: (c) => <SlaCell dueAt={c.getValue()} now={now} /> }),
      column.accessor('priority', { header: 'Priority', cell: (c) => <span className="capitalize">{c.getValue()}</span> }),
      column.accessor('probability', { header: 'Score', cell: (c) => <RiskBadge probability={c.getValue()} /> }),
      column.accessor('amountAtRisk', { header: 'At risk', cell: (c) => <span className="font-mono tabular-nums">{formatMoney(c.getValue())}</span> }),
      column.accessor('status', { header: 'Status', cell: (c) => CASE_STATUS_LABELS[c.getValue()] }),
      column.accessor('assignee', { header: 'Held by', cell: (c) => c.getValue()?.displayName ?? <span className="text-muted">unassigned</span> }),
      column.accessor('card', { header: 'Card', cell: (c) => <CardFragment bin={c.getValue().bin} last4={c.getValue().last4} /> }),
    ],
    [now],
  );

  const table = useReactTable({
    data: page?.items ?? [],
    columns,
    getCoreRowModel: getCoreRowModel(),
    getRowId: (c) => String(c.id),
    state: { rowSelection: selection },
    onRowSelectionChange: setSelection,
    // Only cases that can move: one waiting for approval belongs to its approver now.
    enableRowSelection: (row) => row.original.status !== 'awaiting_approval',
  });
  const selectedIds = Object.keys(selection)
    .filter((k) => selection[k])
    .map(Number);
  const pages = page ? Math.max(1, Math.ceil(page.total / OPEN_CASES_PAGE_SIZE)) : 1;

  useHotkey('a', () => table.toggleAllRowsSelected(!table.getIsAllRowsSelected()), { description: 'Select or clear every case on the page', group: 'Board' });
  useHotkey('r', () => selectedIds.length > 0 && setDialogOpen(true), { description: 'Reassign the selected cases', group: 'Board', enabled: selectedIds.length > 0 });

  const active = people.filter((p) => p.status === 'active');
  return (
    <section aria-labelledby="open-cases-heading" className="flex flex-col gap-2">
      <div className="flex flex-wrap items-end gap-3">
        <h2 id="open-cases-heading" className="text-sm font-semibold text-text">
          Open cases
        </h2>
        <label className="flex items-center gap-2 text-xs text-muted">
          Show
          <select
            className="h-7 rounded border border-control bg-surface px-1 text-sm text-text"
            value={filter.view === 'person' ? `person:${filter.assignee}` : filter.view}
            onChange={(e) => {
              const v = e.target.value;
              setSelection({});
              onFilter(v.startsWith('person:') ? { view: 'person', assignee: Number(v.slice(7)), page: 1 } : { view: v as OpenCasesFilter['view'], page: 1 });
            }}
          >
            <option value="all">All open</option>
            <option value="breached">Past SLA</option>
            <option value="unassigned">Unassigned</option>
            {people.map((p) => (
              <option key={p.id} value={`person:${p.id}`}>
                Held by {p.displayName}
              </option>
            ))}
          </select>
        </label>
        <span className="text-xs text-muted" aria-live="polite">
          {page ? `${page.total} ${page.total === 1 ? 'case' : 'cases'}` : ''}
          {selectedIds.length > 0 && `, ${selectedIds.length} selected`}
        </span>
        <Button size="sm" variant="primary" className="ml-auto" disabled={selectedIds.length === 0} onClick={() => setDialogOpen(true)}>
          Reassign {selectedIds.length > 0 ? selectedIds.length : ''} <KeyHint keys="r" />
        </Button>
      </div>
      {done && (
        <p role="status" className="text-xs text-ok">
          {done}
        </p>
      )}
      {query.isPending ? (
        <LoadingLine />
      ) : query.isError ? (
        <p role="alert" className="text-sm text-danger">
          The open cases could not be loaded: {query.error.message}
        </p>
      ) : (
        <div className="max-h-[28rem] overflow-auto rounded border border-border bg-surface">
          <table className="w-full text-sm">
            <caption className="sr-only">Open cases, soonest SLA deadline first</caption>
            <thead className="sticky top-0 border-b border-border bg-surface text-left text-xs text-muted">
              {table.getHeaderGroups().map((g) => (
                <tr key={g.id}>
                  {g.headers.map((h) => (
                    <th key={h.id} scope="col" className="px-2 py-1.5 font-medium">
                      {flexRender(h.column.columnDef.header, h.getContext())}
                    </th>
                  ))}
                </tr>
              ))}
            </thead>
            <tbody className="divide-y divide-border">
              {table.getRowModel().rows.map((row) => (
                <tr key={row.id} data-selected={row.getIsSelected() || undefined} className="data-[selected]:bg-raised">
                  {row.getVisibleCells().map((cell) => (
                    <td key={cell.id} className="px-2 py-1">
                      {flexRender(cell.column.columnDef.cell, cell.getContext())}
                    </td>
                  ))}
                </tr>
              ))}
              {table.getRowModel().rows.length === 0 && (
                <tr>
                  <td colSpan={columns.length} className="px-2 py-3 text-center text-muted">
                    No open cases here.
                  </td>
                </tr>
              )}
            </tbody>
          </table>
        </div>
      )}
      {pages > 1 && (
        <nav aria-label="Open cases pages" className="flex items-center gap-2 text-xs">
          <Button size="sm" disabled={filter.page <= 1} onClick={() => onFilter({ ...filter, page: filter.page - 1 })}>
            Previous
          </Button>
          <span>
            Page {filter.page} of {pages}
          </span>
          <Button size="sm" disabled={filter.page >= pages} onClick={() => onFilter({ ...filter, page: filter.page + 1 })}>
            Next
          </Button>
        </nav>
      )}
      {dialogOpen && (
        <ReassignDialog
          caseIds={selectedIds}
          people={active}
          onClose={() => setDialogOpen(false)}
          onDone={(message) => {
            setDialogOpen(false);
            setSelection({});
            setDone(message);
          }}
        />
      )}
    </section>
  );
}
