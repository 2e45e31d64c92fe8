import { useState } from 'react';
import { Link, useNavigate } from 'react-router';
import { MODEL_ROLE_LABELS } from '@shared/api/models';
import { Button } from '@/components/ui/button';
import { LoadingLine } from '@/components/ui/spinner';
import { cn } from '@/lib/cn';
import { formatDateTime } from '@/lib/time';
import { useModels } from '../api/get-models';
import { count, duration, num, pct, windowText } from '../utils/format';

/** The registry: every version with its data, counts and headline evaluation; pick two to compare. */
export function VersionsScreen() {
  const { data, isPending, error } = useModels();
  const [picked, setPicked] = useState<number[]>([]);
  const navigate = useNavigate();
  if (isPending) return <LoadingLine />;
  if (error || !data) return <p className="text-sm text-danger">The registry could not be loaded.</p>;
  const toggle = (id: number) => setPicked((p) => (p.includes(id) ? p.filter((x) => x !== id) : [...p, id].slice(-2)));
  return (
    <section aria-labelledby="versions-heading" className="flex flex-col gap-2">
      <div className="flex flex-wrap items-center gap-2">
        <h2 id="versions-heading" className="text-sm font-semibold text-text">
          {data.versions.length} versions
        </h2>
        <Button size="sm" className="ml-auto" disabled={picked.length !== 2} onClick={() => navigate(`/models/compare?a=${picked[0]}&b=${picked[1]}`)}>
          Compare the two chosen
        </Button>
      </div>
      <div className="overflow-x-auto rounded border border-border bg-surface">
        <table className="w-full text-left text-sm tabular-nums">
          <caption className="sr-only">Model versions, newest first</caption>
          <thead>
            <tr className="text-xs text-muted">
              <th scope="col" className="px-2 py-1 font-medium">
                <span className="sr-only">Choose to compare</span>
              </th>
              {['Version', 'Role', 'Registered', 'Data window', 'Rows', 'Fraud', 'PR AUC', 'ROC AUC', 'Brier', 'Precision at budget', 'Recall at budget', 'Rounds', 'Training time'].map((h) => (
                <th key={h} scope="col" className="px-2 py-1 font-medium whitespace-nowrap">
                  {h}
                </th>
              ))}
            </tr>
          </thead>
          <tbody className="divide-y divide-border">
            {data.versions.map((v) => (
              <tr key={v.id} className={cn(v.role === 'champion' && 'bg-raised')}>
                <td className="px-2 py-1">
                  <input type="checkbox" aria-label={`Compare ${v.label}`} checked={picked.includes(v.id)} onChange={() => toggle(v.id)} />
                </td>
                <th scope="row" className="px-2 py-1 font-medium">
                  <Link to={`/models/versions/${v.id}`} className="text-link underline underline-offset-2">
                    {v.label}
                  </Link>
                </th>
                <td className="px-2 py-1">{MODEL_ROLE_LABELS[v.role]}</td>
                <td className="px-2 py-1 whitespace-nowrap">{formatDateTime(v.createdAt)}</td>
                <td className="px-2 py-1 whitespace-nowrap">{windowText(v.dataFrom, v.dataTo)}</td>
                <td className="px-2 py-1 font-mono">{count(v.counts?.rows ?? v.trainRows)}</td>
                <td className="px-2 py-1 font-mono">{count(v.counts?.fraud)}</td>
                <td className="px-2 py-1 font-mono">{num(v.headline.averagePrecision)}</td>
                <td className="px-2 py-1 font-mono">{num(v.headline.rocAuc)}</td>
                <td className="px-2 py-1 font-mono">{num(v.headline.brier, 4)}</td>
                <td className="px-2 py-1 font-mono">{pct(v.headline.precisionAtBudget)}</td>
                <td className="px-2 py-1 font-mono">{pct(v.headline.recallAtBudget)}</td>
                <td className="px-2 py-1 font-mono">{v.rounds}</td>
                <td className="px-2 py-1 font-mono">{duration(v.trainingSeconds)}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <p className="text-xs text-muted">Figures are from each version's own held-out test rows; to compare two on the same rows, choose them and press Compare.</p>
    </section>
  );
}
