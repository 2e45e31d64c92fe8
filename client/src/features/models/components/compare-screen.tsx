import { useSearchParams } from 'react-router';
import { MODEL_ROLE_LABELS } from '@shared/api/models';
import { PanelBoundary } from '@/components/ui/panel-boundary';
import { LoadingLine } from '@/components/ui/spinner';
import { isApiError } from '@/lib/api-client';
import { useComparison } from '../api/get-comparison';
import { useModels } from '../api/get-models';
import { count, num, pct, windowText } from '../utils/format';
import { CurveChart } from './charts';

const idOf = (raw: string | null) => {
  const n = Number(raw);
  return Number.isSafeInteger(n) && n > 0 ? n : 0;
};
const dateParam = (raw: string | null) => (raw && /^\d{4}-\d{2}-\d{2}$/.test(raw) ? raw : '');

/**
 * Two versions side by side on one window: both re-score the same stored
 * features with the labels as known now. The window defaults to the newer
 * version's test rows.
 */
export function CompareScreen() {
  const [search, setSearch] = useSearchParams();
  const models = useModels();
  const a = idOf(search.get('a'));
  const b = idOf(search.get('b'));
  const from = dateParam(search.get('from'));
  const to = dateParam(search.get('to'));
  const params = a && b && a !== b ? { a, b, from: from ? `${from}T00:00:00.000Z` : undefined, to: to ? `${to}T23:59:59.999Z` : undefined } : null;
  const result = useComparison(params);
  const set = (k: string, v: string) => {
    const next = new URLSearchParams(search);
    if (v) next.set(k, v);
    else next.delete(k);
    setSearch(next, { replace: true });
  };
  const versions = models.data?.versions ?? [];
  const picker = (k: 'a' | 'b', value: number) => (
    <label className="flex flex-col gap-1 text-sm font-medium text-text">
      {k === 'a' ? 'First version' : 'Second version'}
      <select value={value || ''} onChange={(e) => set(k, e.target.value)} className="h-9 rounded border border-control bg-surface px-2 text-sm">
        <option value="">Choose…</option>
        {versions.map((v) => (
          <option key={v.id} value={v.id}>
            {v.label} ({MODEL_ROLE_LABELS[v.role].toLowerCase()})
          </option>
        ))}
      </select>
    </label>
  );
  const d = result.data;
  return (
    <div className="flex flex-col gap-3">
      <form className="flex flex-wrap items-end gap-3 rounded border border-border bg-surface p-3" onSubmit={(e) => e.preventDefault()} aria-label="What to compare">
        {picker('a', a)}
        {picker('b', b)}
        <label className="flex flex-col gap-1 text-sm font-medium text-text">
          Window from
          <input type="date" value={from} onChange={(e) => set('from', e.target.value)} className="h-9 rounded border border-control bg-surface px-2 text-sm" />
        </label>
        <label className="flex flex-col gap-1 text-sm font-medium text-text">
          to
          <input type="date" value={to} onChange={(e) => set('to', e.target.value)} className="h-9 rounded border border-control bg-surface px-2 text-sm" />
        </label>
        <p className="text-xs text-muted">Empty dates: the newer version's test window.</p>
      </form>
      {!params ? (
        <p className="text-sm text-muted">Choose two different versions.</p>
      ) : result.isPending ? (
        <LoadingLine label="Scoring both versions on the window…" />
      ) : result.error || !d ? (
        <p role="alert" className="text-sm text-danger">
          {isApiError(result.error) ? result.error.message : 'The comparison could not be computed.'}
        </p>
      ) : (
        <>
          <p className="text-sm text-text">
            {windowText(d.window.from, d.window.to)}: {count(d.rows)} transactions, {count(d.fraud)} fraud, each scored by both versions from the same stored features.
            Alerts at the current threshold {pct(d.threshold)}.
          </p>
          <table className="w-full max-w-3xl text-left text-sm tabular-nums">
            <caption className="sr-only">Both versions on one window</caption>
            <thead>
              <tr className="text-xs text-muted">
                {['Version', 'PR AUC', 'ROC AUC', 'Brier', 'Alerts', 'Precision', 'Recall'].map((h) => (
                  <th key={h} scope="col" className="py-1 pr-3 font-medium">
                    {h}
                  </th>
                ))}
              </tr>
            </thead>
            <tbody className="divide-y divide-border">
              {d.versions.map((v) => (
                <tr key={v.id}>
                  <th scope="row" className="py-1 pr-3 font-medium">
                    {v.label} <span className="text-xs text-muted">{MODEL_ROLE_LABELS[v.role].toLowerCase()}</span>
                    {v.overlapsTraining && <span className="block text-xs text-warn">trained on part of this window: its figures flatter it</span>}
                  </th>
                  <td className="py-1 pr-3 font-mono">{num(v.averagePrecision)}</td>
                  <td className="py-1 pr-3 font-mono">{num(v.rocAuc)}</td>
                  <td className="py-1 pr-3 font-mono">{num(v.brier, 4)}</td>
                  <td className="py-1 pr-3 font-mono">{count(v.alerts)}</td>
                  <td className="py-1 pr-3 font-mono">{pct(v.precision)}</td>
                  <td className="py-1 pr-3 font-mono">{pct(v.recall)}</td>
                </tr>
              ))}
            </tbody>
          </table>
          <div className="grid gap-3 lg:grid-cols-2">
            <PanelBoundary title="Precision-recall curves">
              <CurveChart title="Precision and recall" series={d.versions.map((v) => ({ name: v.label, points: v.curves.pr }))} xLabel="recall" yLabel="precision" />
            </PanelBoundary>
            <PanelBoundary title="ROC curves">
              <CurveChart title="ROC" series={d.versions.map((v) => ({ name: v.label, points: v.curves.roc }))} xLabel="false-positive rate" yLabel="true-positive rate" diagonal />
            </PanelBoundary>
          </div>
        </>
      )}
    </div>
  );
}
