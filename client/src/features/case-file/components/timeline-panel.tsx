import type { CaseTimelineEntry } from '@shared/api/cases';
import { formatDateTime } from '@/lib/time';

function details(entry: CaseTimelineEntry): string | null {
  if (!entry.details) return null;
  const parts = Object.entries(entry.details)
    .filter(([, v]) => v !== null && v !== undefined && v !== '')
    .map(([k, v]) => `${k.replace(/_/g, ' ')}: ${typeof v === 'object' ? JSON.stringify(v) : String(v)}`);
  return parts.length ? parts.join(' · ') : null;
}

/** What happened to the case, from the audit trail, newest first. */
export function TimelinePanel({ timeline }: { timeline: CaseTimelineEntry[] }) {
  const ordered = [...timeline].sort((a, b) => Date.parse(b.at) - Date.parse(a.at));
  if (ordered.length === 0) return <p className="text-xs text-muted">Nothing recorded yet.</p>;
  return (
    <ol className="flex max-h-80 flex-col divide-y divide-border overflow-auto" aria-label="Timeline">
      {ordered.map((entry, i) => {
        const more = details(entry);
        return (
          <li key={`${entry.at}-${i}`} className="grid grid-cols-[7.5rem_1fr] gap-x-2 py-1 text-xs">
            <time dateTime={entry.at} className="text-muted tabular-nums">
              {formatDateTime(entry.at, { seconds: true })}
            </time>
            <span>
              <span className="font-medium text-text">{entry.action}</span>
              <span className={entry.outcome === 'success' || entry.outcome === 'ok' ? 'text-muted' : 'font-medium text-text'}> · {entry.outcome}</span>
              <span className="text-muted"> · {entry.actor ?? 'system'}</span>
              {more && <span className="block break-words text-muted">{more}</span>}
            </span>
          </li>
        );
      })}
    </ol>
  );
}
