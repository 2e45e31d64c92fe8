import { createColumnHelper } from '@tanstack/react-table';
import { Link } from 'react-router';
import { CASE_STATUS_LABELS, type CaseSummary, type Priority, type QueueSortKey } from '@shared/api/cases';
import { CardFragment } from '@/components/ui/card-fragment';
import { MarginBar } from '@/components/ui/margin-bar';
import { RiskBadge } from '@/components/ui/risk-badge';
import { SlaCountdown } from '@/components/ui/sla-countdown';
import { cn } from '@/lib/cn';
import { formatMoney } from '@/lib/money';
import { formatDateTime, formatSpan } from '@/lib/time';
import { useQueueNow } from './queue-clock';

/** What each cell needs besides its row: who is looking, and which rows just arrived. */
export type QueueCellContext = { meId: number; fresh: ReadonlySet<number> };

const PRIORITY_LOOK: Record<Priority, { label: string; className: string }> = {
  urgent: { label: 'Urgent', className: 'font-semibold text-text' },
  high: { label: 'High', className: 'font-medium text-text' },
  standard: { label: 'Standard', className: 'text-muted' },
};

const CHANNEL_LABELS: Record<string, string> = {
  pos: 'In store',
  ecommerce: 'Online',
  atm: 'ATM',
  moto: 'Mail / phone',
  contactless: 'Contactless',
};

export function channelLabel(channel: string): string {
  return CHANNEL_LABELS[channel] ?? channel;
}

function AgeCell({ since }: { since: string }) {
  const now = useQueueNow();
  return (
    <span className="whitespace-nowrap tabular-nums" title={`First alert ${formatDateTime(since)}`}>
      {formatSpan(now - Date.parse(since))}
    </span>
  );
}

function SlaCell({ dueAt }: { dueAt: string }) {
  const now = useQueueNow();
  return <SlaCountdown dueAt={dueAt} now={now} className="text-xs" />;
}

function LastAlertCell({ at }: { at: string }) {
  const now = useQueueNow();
  return (
    <span className="whitespace-nowrap tabular-nums" title={formatDateTime(at, { seconds: true })}>
      {formatSpan(now - Date.parse(at))} ago
    </span>
  );
}

const column = createColumnHelper<CaseSummary>();

/** Server sort key behind each sortable column. */
export const SORT_KEY_OF_COLUMN: Partial<Record<string, QueueSortKey>> = {
  case: 'id',
  priority: 'priority',
  probability: 'probability',
  amount: 'amount',
  lastAlert: 'lastAlert',
  status: 'status',
  age: 'age',
  slaDue: 'slaDue',
};

export function queueColumns(context: QueueCellContext) {
  return [
    column.accessor('id', {
      id: 'case',
      header: 'Case',
      enableHiding: false,
      cell: ({ row }) => {
        const id = row.original.id;
        return (
          <span className="inline-flex items-center gap-1.5 whitespace-nowrap">
            <Link to={`/cases/${id}`} tabIndex={-1} className="font-mono text-link underline-offset-2 hover:underline">
              {id}
            </Link>
            {context.fresh.has(id) && (
              <span
                className="rounded border border-brand px-1 text-[0.6875rem] leading-4 font-medium text-link"
                title="Arrived while you were on this page"
              >
                new
              </span>
            )}
          </span>
        );
      },
    }),
    column.accessor('priority', {
      header: 'Priority',
      cell: ({ getValue }) => {
        const look = PRIORITY_LOOK[getValue()];
        return <span className={look.className}>{look.label}</span>;
      },
    }),
    column.accessor('probability', {
      header: 'Probability',
      cell: ({ row }) => (
        <span className="inline-flex items-center gap-2 whitespace-nowrap">
          <RiskBadge probability={row.original.probability} />
          {/* The number is in the bar's label and title; the queue is too narrow for it twice. */}
          <MarginBar margin={row.original.normalizedMargin} showValue={false} />
        </span>
      ),
    }),
    column.accessor((c) => c.amountAtRisk.minor, {
      id: 'amount',
      header: 'At risk',
      cell: ({ row }) => <span className="font-mono whitespace-nowrap tabular-nums">{formatMoney(row.original.amountAtRisk)}</span>,
    }),
    column.accessor('alertCount', {
      id: 'alerts',
      header: 'Alerts',
      cell: ({ row }) => (
        <span className="font-mono tabular-nums" title={`Last alert ${formatDateTime(row.original.lastAlertAt)}`}>
          {row.original.alertCount}
        </span>
      ),
    }),
    column.accessor('lastAlertAt', {
      id: 'lastAlert',
      header: 'Last alert',
      cell: ({ getValue }) => <LastAlertCell at={getValue()} />,
    }),
    column.accessor('card', {
      header: 'Card',
      cell: ({ getValue }) => {
        const card = getValue();
        return (
          <span className="inline-flex items-center gap-1.5">
            <CardFragment bin={card.bin} last4={card.last4} />
            {card.status === 'blocked' && <span className="rounded bg-raised px-1 text-[0.6875rem] text-text">blocked</span>}
          </span>
        );
      },
    }),
    column.accessor('mcc', {
      header: 'Merchant category',
      cell: ({ row }) => (
        <span className="flex max-w-36 items-baseline gap-1.5" title={row.original.mccLabel ?? undefined}>
          <span className="font-mono">{row.original.mcc}</span>
          <span className="truncate text-muted">{row.original.mccLabel ?? 'Unlisted category'}</span>
        </span>
      ),
    }),
    column.accessor('merchantCountry', {
      id: 'country',
      header: 'Country',
      cell: ({ getValue }) => <span className="font-mono">{getValue()}</span>,
    }),
    column.accessor('channel', {
      header: 'Channel',
      cell: ({ getValue }) => <span className="whitespace-nowrap">{channelLabel(getValue())}</span>,
    }),
    column.accessor('status', {
      header: 'Status',
      cell: ({ getValue }) => <span className="whitespace-nowrap">{CASE_STATUS_LABELS[getValue()] ?? getValue()}</span>,
    }),
    column.accessor('assignee', {
      header: 'Assignee',
      cell: ({ getValue }) => {
        const assignee = getValue();
        if (!assignee) return <span className="text-muted">Unassigned</span>;
        const mine = assignee.id === context.meId;
        return (
          <span className={cn('whitespace-nowrap', mine && 'font-medium')} title={assignee.displayName}>
            {mine ? 'You' : assignee.displayName}
          </span>
        );
      },
    }),
    column.accessor('team', {
      header: 'Team',
      cell: ({ getValue }) => {
        const team = getValue();
        // Why the case is in this person's list: routed to a team they are in, or the shared queue everyone sees.
        if (!team) return <span className="text-muted" title="Shared queue: every investigator sees it">Shared</span>;
        return (
          <span className="block max-w-32 truncate whitespace-nowrap" title={`Routed to ${team.name}`}>
            {team.name}
          </span>
        );
      },
    }),
    column.accessor('firstAlertAt', {
      id: 'age',
      header: 'Age',
      cell: ({ getValue }) => <AgeCell since={getValue()} />,
    }),
    column.accessor('slaDueAt', {
      id: 'slaDue',
      header: 'SLA',
      cell: ({ getValue }) => <SlaCell dueAt={getValue()} />,
    }),
  ];
}

/** Numbers read down a column best right-aligned. */
export const RIGHT_ALIGNED_COLUMNS = new Set(['amount', 'alerts']);

/** Column ids a person may show or hide, in table order, with their header text. */
export const HIDEABLE_COLUMNS: { id: string; label: string }[] = [
  { id: 'priority', label: 'Priority' },
  { id: 'probability', label: 'Probability' },
  { id: 'amount', label: 'At risk' },
  { id: 'alerts', label: 'Alerts' },
  { id: 'lastAlert', label: 'Last alert' },
  { id: 'card', label: 'Card' },
  { id: 'mcc', label: 'Merchant category' },
  { id: 'country', label: 'Country' },
  { id: 'channel', label: 'Channel' },
  { id: 'status', label: 'Status' },
  { id: 'assignee', label: 'Assignee' },
  { id: 'team', label: 'Team' },
  { id: 'age', label: 'Age' },
  { id: 'slaDue', label: 'SLA' },
];

/** Shown until the person picks their own. */
export const DEFAULT_VISIBLE_COLUMNS = HIDEABLE_COLUMNS.map((c) => c.id).filter((id) => id !== 'lastAlert');
