import { backfillErrorReportUrl, type BackfillImport } from '@shared/api/backfill';
import { formatBytes, formatCount, percent } from '../format';
import { ProgressBar } from './progress-bar';

export type ImportPhase =
  | { kind: 'sending' }
  | { kind: 'finished' }
  | { kind: 'failed'; message: string }
  | { kind: 'cancelled' };

export type ImportProgressProps = {
  fileName: string;
  fileSize: number;
  phase: ImportPhase;
  /** Bytes the browser has handed to the network so far. */
  sent: { loaded: number; total: number } | null;
  /** What the server last said about the run (socket event, poll or final answer). */
  run: Pick<BackfillImport, 'id' | 'counts'> | null;
};

function statusLine({ phase, run, sent }: ImportProgressProps): string {
  if (phase.kind === 'failed') return `Stopped: ${phase.message}`;
  if (phase.kind === 'cancelled') return 'Cancelled. Rows stored before the cancel are kept; uploading the file again skips them as duplicates.';
  if (phase.kind === 'finished') return 'Finished.';
  if (run) return `Processing: ${formatCount(run.counts.rowsRead)} rows read.`;
  if (sent && sent.loaded >= sent.total) return 'Sent; waiting for the server.';
  return 'Sending…';
}

const COUNT_COLUMNS = [
  ['rowsRead', 'Rows read'],
  ['accepted', 'Accepted'],
  ['duplicate', 'Duplicate'],
  ['rejected', 'Rejected'],
  ['labelsAdded', 'Labels added'],
] as const;

/** One upload as it goes: bytes sent, bytes the server has processed, and the row counts. */
export function ImportProgress(props: ImportProgressProps) {
  const { fileName, fileSize, phase, sent, run } = props;
  const done = phase.kind === 'finished';
  const sentPercent = sent ? percent(sent.loaded, sent.total) : done ? 100 : null;
  const processed = run ? (done ? 100 : percent(run.counts.bytesRead, fileSize)) : null;
  const counts = run?.counts;
  return (
    <section aria-labelledby="import-progress-heading" className="flex flex-col gap-3 rounded border border-border bg-surface px-3 py-3">
      <h2 id="import-progress-heading" className="text-sm font-semibold text-text">
        {fileName}
        {run ? <span className="ml-2 font-mono text-xs font-normal text-muted">import {run.id}</span> : null}
      </h2>
      <p role="status" className={phase.kind === 'failed' ? 'text-sm text-danger' : 'text-sm text-text'}>
        {statusLine(props)}
      </p>
      <div className="grid gap-3 sm:grid-cols-2">
        <ProgressBar label="Sent" value={sentPercent} detail={sent ? `${formatBytes(sent.loaded)} of ${formatBytes(sent.total)}` : undefined} />
        <ProgressBar
          label="Processed on the server"
          value={processed}
          detail={run ? `${formatBytes(run.counts.bytesRead)} of ${formatBytes(fileSize)}` : undefined}
        />
      </div>
      <table className="w-full max-w-2xl border-separate border-spacing-0 text-sm">
        <caption className="sr-only">Rows of this file so far</caption>
        <thead className="bg-raised">
          <tr>
            {COUNT_COLUMNS.map(([key, label]) => (
              <th key={key} scope="col" className="border-b border-border px-2 py-1 text-right text-xs font-medium text-muted">
                {label}
              </th>
            ))}
          </tr>
        </thead>
        <tbody>
          <tr>
            {COUNT_COLUMNS.map(([key]) => (
              <td key={key} className="border-b border-border px-2 py-1 text-right font-mono">
                {counts ? formatCount(counts[key]) : '–'}
              </td>
            ))}
          </tr>
        </tbody>
      </table>
      {run && run.counts.rejected > 0 && (
        <p className="text-sm">
          <a href={backfillErrorReportUrl(run.id)} download className="text-link underline underline-offset-2">
            Download error report
          </a>
          <span className="text-muted"> ({formatCount(run.counts.rejected)} rejected {run.counts.rejected === 1 ? 'row' : 'rows'}, with line, field and reason)</span>
        </p>
      )}
    </section>
  );
}
