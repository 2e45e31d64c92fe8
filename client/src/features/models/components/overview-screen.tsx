import { useState } from 'react';
import { Link } from 'react-router';
import { can, type Role } from '@shared/auth/roles';
import { MODEL_ROLE_LABELS, type ModelVersionSummary } from '@shared/api/models';
import { Button } from '@/components/ui/button';
import { CautionNote } from '@/components/ui/caution-note';
import { Dialog } from '@/components/ui/dialog';
import { PanelBoundary } from '@/components/ui/panel-boundary';
import { LoadingLine } from '@/components/ui/spinner';
import { useModels } from '../api/get-models';
import { useShadow } from '../api/get-shadow';
import { count, duration, num, pct, windowText } from '../utils/format';
import { PromotionForm } from './promotion-form';
import { PromotionRequests } from './promotion-requests';

function VersionCard({ title, v, note }: { title: string; v: ModelVersionSummary | undefined; note: string }) {
  return (
    <section aria-label={title} className="flex flex-col gap-2 rounded border border-border bg-surface p-3">
      <h2 className="text-xs font-semibold tracking-wide text-muted uppercase">{title}</h2>
      {!v ? (
        <p className="text-sm text-muted">{note}</p>
      ) : (
        <>
          <p className="flex items-baseline gap-2">
            <Link to={`/models/versions/${v.id}`} className="text-base font-semibold text-link underline underline-offset-2">
              {v.label}
            </Link>
            <span className="text-xs text-muted">
              trained {windowText(v.dataFrom, v.dataTo)} · {count(v.counts?.rows)} rows, {count(v.counts?.fraud)} fraud · {v.rounds} rounds in {duration(v.trainingSeconds)}
            </span>
          </p>
          <dl className="grid grid-cols-2 gap-x-4 gap-y-1 text-xs sm:grid-cols-5">
            {[
              ['PR AUC', num(v.headline.averagePrecision)],
              ['ROC AUC', num(v.headline.rocAuc)],
              ['Brier', num(v.headline.brier, 4)],
              ['Precision at budget', pct(v.headline.precisionAtBudget)],
              ['Recall at budget', pct(v.headline.recallAtBudget)],
            ].map(([k, val]) => (
              <div key={k}>
                <dt className="text-muted">{k}</dt>
                <dd className="font-mono text-sm text-text">{val}</dd>
              </div>
            ))}
          </dl>
          <p className="text-xs text-muted">
            Held-out test rows newer than the training rows. <Link to={`/models/versions/${v.id}/card`} className="text-link underline underline-offset-2">Model card</Link>
          </p>
        </>
      )}
    </section>
  );
}

const SHADOW_DAYS = [7, 14, 30] as const;

/** Champion and challenger on the same live transactions. */
function ShadowPanel() {
  const [days, setDays] = useState<number>(14);
  const { data, isPending, error } = useShadow(days);
  return (
    <section aria-labelledby="shadow-heading" className="flex flex-col gap-2 rounded border border-border bg-surface p-3">
      <div className="flex flex-wrap items-center gap-2">
        <h2 id="shadow-heading" className="text-sm font-semibold text-text">
          Champion and challenger on live traffic
        </h2>
        <label className="ml-auto flex items-center gap-1 text-xs text-muted">
          Since
          <select value={days} onChange={(e) => setDays(Number(e.target.value))} className="h-7 rounded border border-control bg-surface px-1 text-xs text-text">
            {SHADOW_DAYS.map((d) => (
              <option key={d} value={d}>
                {d} days ago
              </option>
            ))}
          </select>
        </label>
      </div>
      {isPending ? (
        <LoadingLine />
      ) : error || !data ? (
        <p className="text-sm text-danger">The comparison could not be loaded.</p>
      ) : !data.challenger || !data.champion ? (
        <p className="text-sm text-muted">No challenger is scoring in shadow. A training run registers its result as the challenger.</p>
      ) : (
        <>
          <p className="text-xs text-muted">
            {count(data.transactions)} transactions scored by both; {count(data.labelled)} labelled since ({count(data.fraud)} fraud). Alerts counted at the current
            threshold {pct(data.threshold)}; {count(data.bothAlerted)} would be raised by both.
          </p>
          <table className="w-full text-left text-sm tabular-nums">
            <caption className="sr-only">Champion and challenger on the same transactions</caption>
            <thead>
              <tr className="text-xs text-muted">
                <th scope="col" className="py-1 pr-3 font-medium">Version</th>
                <th scope="col" className="py-1 pr-3 font-medium">Alerts it would raise</th>
                <th scope="col" className="py-1 pr-3 font-medium">of them labelled</th>
                <th scope="col" className="py-1 pr-3 font-medium">Fraud caught</th>
                <th scope="col" className="py-1 pr-3 font-medium">Precision</th>
                <th scope="col" className="py-1 font-medium">Recall</th>
              </tr>
            </thead>
            <tbody className="divide-y divide-border">
              {[
                ['Champion', data.champion],
                ['Challenger', data.challenger],
              ].map(([name, s]) => {
                const side = s as NonNullable<typeof data.champion>;
                return (
                  <tr key={String(name)}>
                    <th scope="row" className="py-1 pr-3 font-medium">
                      {String(name)} <span className="font-mono text-xs text-muted">{side.label}</span>
                    </th>
                    <td className="py-1 pr-3 font-mono">{count(side.alerts)}</td>
                    <td className="py-1 pr-3 font-mono">{count(side.labelledAlerts)}</td>
                    <td className="py-1 pr-3 font-mono">{count(side.fraudCaught)}</td>
                    <td className="py-1 pr-3 font-mono">{pct(side.precision)}</td>
                    <td className="py-1 font-mono">{pct(side.recall)}</td>
                  </tr>
                );
              })}
            </tbody>
          </table>
          <p className="text-xs text-muted">
            Labels come from the champion's alerts (dispositions) and from chargebacks, so these figures lean towards the champion: the challenger's extra alerts
            are mostly unlabelled.
          </p>
        </>
      )}
    </section>
  );
}

export function OverviewScreen({ viewer }: { viewer: { id: number; role: Role } }) {
  const { data, isPending } = useModels();
  const [asking, setAsking] = useState(false);
  if (isPending || !data) return <LoadingLine />;
  const champion = data.versions.find((v) => v.id === data.championId);
  const challenger = data.versions.find((v) => v.id === data.challengerId);
  const canPromote = can(viewer.role, 'models:promote');
  return (
    <div className="flex flex-col gap-4">
      <div className="grid gap-3 lg:grid-cols-2">
        <VersionCard title="Champion: scores and alerts" v={champion} note="No champion yet: nothing is scored until one is installed." />
        <VersionCard title="Challenger: scores in shadow" v={challenger} note="No challenger. Train a new version on the Training tab." />
      </div>
      <div className="flex flex-wrap items-center gap-2">
        {champion && challenger && (
          <Link to={`/models/compare?a=${champion.id}&b=${challenger.id}`} className="text-sm text-link underline underline-offset-2">
            Compare them on the same window
          </Link>
        )}
        {canPromote && (
          <Button variant="primary" size="sm" onClick={() => setAsking(true)} className="ml-auto">
            Ask to promote or roll back…
          </Button>
        )}
      </div>
      {asking && (
        <Dialog title="Ask to change the champion" onClose={() => setAsking(false)}>
          <PromotionForm versions={data.versions} championId={data.championId} initialVersionId={challenger?.id} />
        </Dialog>
      )}
      <PanelBoundary title="Champion and challenger on live traffic">
        <ShadowPanel />
      </PanelBoundary>
      <PanelBoundary title="Promotion requests">
        <section aria-labelledby="requests-heading" className="rounded border border-border bg-surface p-3">
          <h2 id="requests-heading" className="text-sm font-semibold text-text">
            Promotion and rollback requests
          </h2>
          <PromotionRequests meId={viewer.id} canApprove={can(viewer.role, 'models:approve')} />
        </section>
      </PanelBoundary>
      <p className="text-xs text-muted">
        Roles: {Object.entries(MODEL_ROLE_LABELS).map(([k, v]) => `${v} (${data.versions.filter((x) => x.role === k).length})`).join(' · ')}
      </p>
      <CautionNote />
    </div>
  );
}
