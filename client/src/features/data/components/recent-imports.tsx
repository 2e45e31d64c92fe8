import { format } from 'date-fns';
import type { BackfillImport, BackfillStatus } from '@shared/api/backfill';
import { LoadingLine } from '@/components/ui/spinner';
import { cn } from '@/lib/cn';
import { formatCount } from '../format';

const STATUS_WORD: Record<BackfillStatus, string> = {
  running: 'running',
  completed: 'finished',
  failed: 'failed',
  interrupted: 'interrupted',
};

const cell = 'border-b border-border px-2 py-1 align-middle';
const head = 'border-b border-border px-2 py-1.5 text-left text-xs font-medium whitespace-nowrap text-muted';

export type RecentImportsProps = {
  imports: BackfillImport[] | undefined;
  loading: boolean;
  error: string | null;
  /** Admins see everyone's runs, so the uploader is shown. */
  showUploader: boolean;
};

export function RecentImports({ imports, loading, error, showUploader }: RecentImportsProps) {
  return (
    <section aria-labelledby="recent-imports-heading" className="flex flex-col gap-2">
      <h2 id="recent-imports-heading" className="text-sm font-semibold text-text">
        Recent imports
      </h2>
      {loading && <LoadingLine label="Loading imports…" />}
      {error && (
        <p role="alert" className="text-sm text-danger">
          {error}
        </p>
      )}
      {imports && imports.length === 0 && <p className="text-sm text-muted">No imports yet.</p>}
      {imports && imports.length > 0 && (
        <div className="overflow-auto rounded border border-border bg-surface">
          <table className="w-full border-separate border-spacing-0 text-sm">
            <caption className="sr-only">{showUploader ? 'Recent imports by everyone' : 'Your recent imports'}</caption>
            <thead className="bg-raised">
              <tr>
                <th scope="col" className={head}>Started</th>
                <th scope="col" className={head}>File</th>
                {showUploader && <th scope="col" className={head}>Uploaded by</th>}
                <th scope="col" className={head}>Status</th>
                <th scope="col" className={cn(head, 'text-right')}>Read</th>
                <th scope="col" className={cn(head, 'text-right')}>Accepted</th>
                <th scope="col" className={cn(head, 'text-right')}>Duplicate</th>
                <th scope="col" className={cn(head, 'text-right')}>Rejected</th>
                <th scope="col" className={head}>Report</th>
              </tr>
            </thead>
            <tbody>
              {imports.map((run) => (
                <tr key={run.id}>
                  <td className={cn(cell, 'font-mono whitespace-nowrap')}>{format(new Date(run.startedAt), 'yyyy-MM-dd HH:mm')}</td>
                  <td className={cn(cell, 'max-w-64 truncate')} title={run.fileName}>
                    {run.fileName}
                  </td>
                  {showUploader && <td className={cell}>{run.uploadedBy.displayName}</td>}
                  <td className={cn(cell, run.status === 'failed' || run.status === 'interrupted' ? 'text-danger' : 'text-text')}>
                    {STATUS_WORD[run.status]}
                    {run.error ? <span className="block text-xs text-muted">{run.error.message}</span> : null}
                  </td>
                  <td className={cn(cell, 'text-right font-mono')}>{formatCount(run.counts.rowsRead)}</td>
                  <td className={cn(cell, 'text-right font-mono')}>{formatCount(run.counts.accepted)}</td>
                  <td className={cn(cell, 'text-right font-mono')}>{formatCount(run.counts.duplicate)}</td>
                  <td className={cn(cell, 'text-right font-mono')}>{formatCount(run.counts.rejected)}</td>
                  <td className={cell}>
                    {run.errorReportUrl ? (
                      <a href={run.errorReportUrl} download className="text-link underline underline-offset-2" aria-label={`Error report of import ${run.id}`}>
                        errors.csv
                      </a>
                    ) : (
                      <span className="text-muted">–</span>
                    )}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
    </section>
  );
}
