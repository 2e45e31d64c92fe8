import { useState } from 'react';
import { can, type Role } from '@shared/auth/roles';
import { PSI_FLAG, type PsiBand } from '@shared/api/models';
import { Button } from '@/components/ui/button';
import { PanelBoundary } from '@/components/ui/panel-boundary';
import { LoadingLine } from '@/components/ui/spinner';
import { cn } from '@/lib/cn';
import { formatDateTime } from '@/lib/time';
import { useDriftReports } from '../api/get-drift-reports';
import { useModels } from '../api/get-models';
import { useRunDriftReport } from '../api/run-drift-report';
import { count, num } from '../utils/format';
import { PsiHistoryChart } from './charts';

const BAND_TEXT: Record<PsiBand, { word: string; className: string }> = {
  stable: { word: 'stable', className: 'text-ok' },
  watch: { word: 'watch', className: 'text-warn' },
  act: { word: 'act', className: 'text-danger font-semibold' },
};

function Band({ band }: { band: PsiBand }) {
  // The word carries the meaning; the colour only echoes it.
  return <span className={BAND_TEXT[band].className}>{BAND_TEXT[band].word}</span>;
}

/** Daily PSI of the champion's score and features against its training rows, over time; flags above 0.25. */
export function DriftScreen({ viewer }: { viewer: { role: Role } }) {
  const models = useModels();
  const [versionId, setVersionId] = useState<number | null>(null);
  const shown = versionId ?? models.data?.championId ?? null;
  const reports = useDriftReports(shown);
  const run = useRunDriftReport();
  const latest = reports.data?.[reports.data.length - 1];
  return (
    <div className="flex flex-col gap-3">
      <div className="flex flex-wrap items-end gap-3">
        <label className="flex flex-col gap-1 text-sm font-medium text-text">
          Version
          <select value={shown ?? ''} onChange={(e) => setVersionId(Number(e.target.value) || null)} className="h-9 rounded border border-control bg-surface px-2 text-sm">
            {(models.data?.versions ?? []).map((v) => (
              <option key={v.id} value={v.id}>
                {v.label}
                {v.id === models.data?.championId ? ' (champion)' : ''}
              </option>
            ))}
          </select>
        </label>
        {can(viewer.role, 'models:train') && (
          <Button onClick={() => run.mutate()} disabled={run.isPending}>
            {run.isPending ? 'Queuing…' : run.isSuccess ? 'Queued: the report appears when it is ready' : 'Compute the champion’s report now'}
          </Button>
        )}
        <p className="text-xs text-muted">Reports run daily at 03:20 UTC over the last 24 hours of scored traffic.</p>
      </div>
      {reports.isPending ? (
        <LoadingLine />
      ) : !reports.data || reports.data.length === 0 ? (
        <p className="text-sm text-muted">No drift report for this version yet.</p>
      ) : (
        <>
          <PanelBoundary title="PSI over time">
            <PsiHistoryChart reports={reports.data} />
          </PanelBoundary>
          {latest && (
            <section aria-labelledby="latest-drift" className="rounded border border-border bg-surface p-3">
              <h2 id="latest-drift" className="text-sm font-semibold text-text">
                Latest report: {formatDateTime(latest.windowTo)}, {count(latest.rows)} scored transactions
              </h2>
              {latest.flagged.length > 0 ? (
                <p role="status" className="mt-1 text-sm text-danger">
                  Above {PSI_FLAG}: {latest.flagged.join(', ')}. The traffic changed since training; check the labels of recent weeks before retraining. The data
                  scientists were e-mailed.
                </p>
              ) : (
                <p className="mt-1 text-sm text-text">Nothing above {PSI_FLAG}.</p>
              )}
              <table className="mt-2 w-full max-w-xl text-left text-sm tabular-nums">
                <caption className="sr-only">PSI by feature, largest first</caption>
                <thead>
                  <tr className="text-xs text-muted">
                    <th scope="col" className="py-1 pr-3 font-medium">What</th>
                    <th scope="col" className="py-1 pr-3 font-medium">PSI</th>
                    <th scope="col" className="py-1 font-medium">Band</th>
                  </tr>
                </thead>
                <tbody className="divide-y divide-border">
                  {[{ feature: 'score (probability)', psi: latest.score.psi, band: latest.score.band }, ...[...latest.features].sort((x, y) => y.psi - x.psi)].map((f) => (
                    <tr key={f.feature} className={cn(f.psi > PSI_FLAG && 'bg-raised')}>
                      <th scope="row" className="py-0.5 pr-3 font-medium">
                        {f.feature}
                      </th>
                      <td className="py-0.5 pr-3 font-mono">{num(f.psi)}</td>
                      <td className="py-0.5">
                        <Band band={f.band} />
                      </td>
                    </tr>
                  ))}
                </tbody>
              </table>
              <p className="mt-1 text-xs text-muted">
                PSI = Σ (a − e) ln(a / e) over the bins of the training rows (deciles for numbers, categories for codes). Below 0.1 stable, 0.1–0.25 watch, above 0.25 act: a
                rule of thumb, not a test.
              </p>
            </section>
          )}
        </>
      )}
    </div>
  );
}
