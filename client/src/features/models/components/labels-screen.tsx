import { useId, useRef, useState } from 'react';
import { can, type Role } from '@shared/auth/roles';
import { FRAUD_TYPE_LABELS } from '@shared/api/cases';
import { LATE_LABEL_COLUMNS, LATE_LABEL_FRAUD_TYPES, type LabelImport } from '@shared/api/models';
import { Button } from '@/components/ui/button';
import { PanelBoundary } from '@/components/ui/panel-boundary';
import { LoadingLine } from '@/components/ui/spinner';
import { formatDateTime } from '@/lib/time';
import { useLabelCoverage } from '../api/get-label-coverage';
import { useLabelDelay } from '../api/get-label-delay';
import { useLabelImports } from '../api/get-label-imports';
import { useUploadLateLabels } from '../api/upload-late-labels';
import { count, pct } from '../utils/format';
import { CoverageChart, DelayChart } from './charts';

function ImportSummary({ run }: { run: LabelImport }) {
  return (
    <p className="text-sm text-text">
      {run.fileName}: {count(run.counts.rowsRead)} rows read, {count(run.counts.added)} labels added, {count(run.counts.duplicate)} already known, {count(run.counts.rejected)}{' '}
      rejected.{' '}
      {run.errorReportUrl && (
        <a href={run.errorReportUrl} className="text-link underline underline-offset-2" download>
          Download the error report (CSV)
        </a>
      )}
      {run.error && <span className="block text-danger">{run.error.message}</span>}
    </p>
  );
}

/** Late labels: chargebacks reported weeks after the transaction, as a CSV file. */
function UploadLateLabels() {
  const id = useId();
  const input = useRef<HTMLInputElement>(null);
  const [file, setFile] = useState<File | null>(null);
  const upload = useUploadLateLabels();
  const result = upload.data;
  return (
    <section aria-labelledby={`${id}-title`} className="flex flex-col gap-2 rounded border border-border bg-surface p-3">
      <h2 id={`${id}-title`} className="text-sm font-semibold text-text">
        Add late labels (chargebacks)
      </h2>
      <p className="text-xs text-muted">
        A CSV file with the header <code className="font-mono">{LATE_LABEL_COLUMNS.join(',')}</code>: the upstream transaction id, the date the chargeback was reported
        (YYYY-MM-DD or an ISO 8601 time), and the fraud type ({LATE_LABEL_FRAUD_TYPES.map((t) => `${t}: ${FRAUD_TYPE_LABELS[t].toLowerCase()}`).join('; ')}). Each row is
        checked on its own; rejected rows are listed in a report you can download.
      </p>
      <form
        className="flex flex-wrap items-end gap-2"
        onSubmit={(e) => {
          e.preventDefault();
          if (file) upload.mutate(file);
        }}
      >
        <label htmlFor={`${id}-file`} className="flex flex-col gap-1 text-sm font-medium text-text">
          File
          <input
            ref={input}
            id={`${id}-file`}
            type="file"
            accept=".csv,text/csv"
            onChange={(e) => setFile(e.target.files?.[0] ?? null)}
            className="text-sm text-text file:mr-2 file:rounded file:border file:border-control file:bg-surface file:px-2 file:py-1"
          />
        </label>
        <Button type="submit" variant="primary" disabled={!file || upload.isPending}>
          {upload.isPending ? 'Importing…' : 'Import'}
        </Button>
      </form>
      <div aria-live="polite">
        {upload.error && <p className="text-sm text-danger">The import could not be completed. Try again.</p>}
        {result?.error && <p className="text-sm text-danger">{result.error}</p>}
        {result?.import && <ImportSummary run={result.import} />}
      </div>
    </section>
  );
}

export function LabelsScreen({ viewer }: { viewer: { role: Role } }) {
  const [weeks, setWeeks] = useState(12);
  const coverage = useLabelCoverage(weeks);
  const delay = useLabelDelay(180);
  const canUpload = can(viewer.role, 'data:backfill');
  const imports = useLabelImports(canUpload);
  const totals = (coverage.data ?? []).reduce((s, w) => ({ n: s.n + w.transactions, l: s.l + w.labelled, f: s.f + w.fraud }), { n: 0, l: 0, f: 0 });
  return (
    <div className="flex flex-col gap-3">
      <p className="max-w-prose text-sm text-text">
        Every disposition is a label; chargebacks add fraud labels weeks later. Unlabelled transactions older than the label delay count as legitimate in training, so fraud
        that was never alerted and never charged back is missing from the labels.
      </p>
      <div className="flex flex-wrap items-center gap-2 text-sm">
        <label className="flex items-center gap-1 text-xs text-muted">
          Weeks shown
          <select value={weeks} onChange={(e) => setWeeks(Number(e.target.value))} className="h-7 rounded border border-control bg-surface px-1 text-xs text-text">
            {[8, 12, 26, 52].map((w) => (
              <option key={w} value={w}>
                {w}
              </option>
            ))}
          </select>
        </label>
        {coverage.data && (
          <span className="text-xs text-muted">
            {count(totals.n)} transactions, {count(totals.l)} labelled ({pct(totals.n ? totals.l / totals.n : null)}), {count(totals.f)} fraud.
          </span>
        )}
      </div>
      <div className="grid gap-3 lg:grid-cols-2">
        <PanelBoundary title="Label coverage">{coverage.isPending || !coverage.data ? <LoadingLine /> : <CoverageChart weeks={coverage.data} />}</PanelBoundary>
        <PanelBoundary title="Label delay">{delay.isPending || !delay.data ? <LoadingLine /> : <DelayChart delay={delay.data} />}</PanelBoundary>
      </div>
      {canUpload && (
        <>
          <UploadLateLabels />
          <section aria-labelledby="imports-heading" className="rounded border border-border bg-surface p-3">
            <h2 id="imports-heading" className="text-sm font-semibold text-text">
              Your recent imports
            </h2>
            {imports.data?.length ? (
              <ul className="mt-1 flex flex-col gap-1">
                {imports.data.map((run) => (
                  <li key={run.id} className="text-xs text-muted">
                    {formatDateTime(run.startedAt)} · <ImportSummary run={run} />
                  </li>
                ))}
              </ul>
            ) : (
              <p className="text-xs text-muted">None yet.</p>
            )}
          </section>
        </>
      )}
    </div>
  );
}
