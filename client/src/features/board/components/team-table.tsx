import type { BoardResponse } from '@shared/api/supervision';
import { ROLE_LABELS } from '@shared/auth/roles';
import { cn } from '@/lib/cn';

function Breaches({ n }: { n: number }) {
  if (n === 0) return <span className="text-muted">none</span>;
  // The word carries it; the colour and the icon only echo it.
  return (
    <span className="inline-flex items-center gap-1 font-medium text-danger">
      <svg aria-hidden="true" viewBox="0 0 16 16" className="h-3.5 w-3.5 fill-current">
        <path d="M8 1a7 7 0 1 0 0 14A7 7 0 0 0 8 1Zm2.6 3.4 1 1L9 8l2.6 2.6-1 1L8 9l-2.6 2.6-1-1L7 8 4.4 5.4l1-1L8 7l2.6-2.6Z" />
      </svg>
      {n} past SLA
    </span>
  );
}

function minutes(m: number | null): string {
  if (m === null) return '–';
  if (m < 60) return `${m.toFixed(m < 10 ? 1 : 0)} min`;
  return `${Math.floor(m / 60)} h ${String(Math.round(m % 60)).padStart(2, '0')} min`;
}

/**
 * Who holds what: per person their open and claimed cases, what they closed
 * today, their median claim-to-close time today and their cases past SLA.
 * Choosing a person shows their cases in the table below.
 */
export function TeamTable({ board, onPick, picked }: { board: BoardResponse; onPick: (personId: number | null) => void; picked: number | null }) {
  return (
    <div className="overflow-x-auto rounded border border-border bg-surface">
      <table className="w-full text-sm">
        <caption className="sr-only">Workload per person, today (UTC)</caption>
        <thead className="border-b border-border text-left text-xs text-muted">
          <tr>
            <th scope="col" className="px-3 py-2 font-medium">Person</th>
            <th scope="col" className="px-3 py-2 text-right font-medium">Open</th>
            <th scope="col" className="px-3 py-2 text-right font-medium">Claimed</th>
            <th scope="col" className="px-3 py-2 text-right font-medium">Closed today</th>
            <th scope="col" className="px-3 py-2 text-right font-medium">Median claim → close</th>
            <th scope="col" className="px-3 py-2 font-medium">SLA</th>
          </tr>
        </thead>
        <tbody className="divide-y divide-border">
          {board.people.map((p) => (
            <tr key={p.id} className={cn(picked === p.id && 'bg-raised')}>
              <th scope="row" className="px-3 py-1.5 text-left font-normal">
                <button
                  type="button"
                  className="text-link underline-offset-2 hover:underline"
                  aria-pressed={picked === p.id}
                  onClick={() => onPick(picked === p.id ? null : p.id)}
                >
                  {p.displayName}
                </button>
                <span className="ml-2 text-xs text-muted">
                  {ROLE_LABELS[p.role]}
                  {p.status !== 'active' && `, ${p.status}`}
                </span>
              </th>
              <td className="px-3 py-1.5 text-right tabular-nums">{p.open}</td>
              <td className="px-3 py-1.5 text-right tabular-nums">{p.claimed}</td>
              <td className="px-3 py-1.5 text-right tabular-nums">{p.closedToday}</td>
              <td className="px-3 py-1.5 text-right tabular-nums">{minutes(p.medianHandlingMinutes)}</td>
              <td className="px-3 py-1.5">
                <Breaches n={p.slaBreaches} />
              </td>
            </tr>
          ))}
          <tr className="bg-canvas/50">
            <th scope="row" className="px-3 py-1.5 text-left font-normal text-muted">
              Unassigned (shared queue)
            </th>
            <td className="px-3 py-1.5 text-right tabular-nums">{board.unassigned.open}</td>
            <td className="px-3 py-1.5 text-right text-muted">–</td>
            <td className="px-3 py-1.5 text-right text-muted">–</td>
            <td className="px-3 py-1.5 text-right text-muted">–</td>
            <td className="px-3 py-1.5">
              <Breaches n={board.unassigned.slaBreaches} />
            </td>
          </tr>
        </tbody>
      </table>
    </div>
  );
}
