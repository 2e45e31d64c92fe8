import { useState } from 'react';
import { Link } from 'react-router';
import { MODEL_ROLE_LABELS, type ModelVersionDetail } from '@shared/api/models';
import { PanelBoundary } from '@/components/ui/panel-boundary';
import { LoadingLine } from '@/components/ui/spinner';
import { cn } from '@/lib/cn';
import { formatDateTime } from '@/lib/time';
import { useModelVersion } from '../api/get-model-version';
import { count, duration, num, pct, windowText } from '../utils/format';
import { ClassHistogramChart, CurveChart, ImportanceChart, LossChart, ReliabilityChart, StepFunctionChart } from './charts';

function Facts({ v }: { v: ModelVersionDetail }) {
  const e = v.evaluation;
  const facts: [string, string][] = [
    ['Role', MODEL_ROLE_LABELS[v.role]],
    ['Registered', formatDateTime(v.createdAt)],
    ['Promoted', v.promotedAt ? formatDateTime(v.promotedAt) : '–'],
    ['Data window', windowText(v.dataFrom, v.dataTo)],
    ['Rows (fraud)', `${count(v.counts?.rows)} (${count(v.counts?.fraud)})`],
    ['Labelled / presumed legitimate', `${count(v.counts?.labelled)} / ${count(v.counts?.presumedLegitimate)}`],
    ['Train / validation / test', `${count(v.counts?.train)} / ${count(v.counts?.validation)} / ${count(v.counts?.test)}`],
    ['Rounds kept / run', `${v.training.bestRound} / ${v.training.roundsRun} (${v.training.stoppedBy})`],
    ['Training time', duration(v.trainingSeconds)],
    ['Test PR AUC', num(e?.averagePrecision)],
    ['Test ROC AUC', num(e?.rocAuc)],
    ['Brier score', num(e?.brier, 4)],
    ['Alert budget / day', e?.alertBudget ? String(e.alertBudget.dailyBudget) : '–'],
    ['Precision / recall at budget', e?.alertBudget ? `${pct(e.alertBudget.precision)} / ${pct(e.alertBudget.recall)}` : '–'],
    ['Money caught at budget', pct(e?.alertBudget?.amountRecall)],
    ['Platt a, b', v.calibration ? `${num(v.calibration.a)}, ${num(v.calibration.b)}` : '–'],
  ];
  return (
    <dl className="grid grid-cols-2 gap-x-4 gap-y-1 rounded border border-border bg-surface p-3 text-xs sm:grid-cols-4">
      {facts.map(([k, val]) => (
        <div key={k}>
          <dt className="text-muted">{k}</dt>
          <dd className="font-mono text-sm text-text">{val}</dd>
        </div>
      ))}
    </dl>
  );
}

function RoundTable({ v }: { v: ModelVersionDetail }) {
  const [all, setAll] = useState(false);
  const rows = all ? v.roundTable : v.roundTable.slice(0, 30);
  return (
    <section aria-labelledby="rounds-heading" className="rounded border border-border bg-surface p-3">
      <h3 id="rounds-heading" className="text-sm font-semibold text-text">
        Rounds
      </h3>
      <p className="text-xs text-muted">
        Each round adds one stump h(x) = s on the right side of its rule, −s elsewhere, weighted by α = ν · ½ ln((1 − ε) / ε); the edge r = 1 − 2ε. Greyed rounds came after
        the best validation round and are not in the model.
      </p>
      <div className="mt-1 max-h-96 overflow-auto">
        <table className="w-full text-left text-xs tabular-nums">
          <caption className="sr-only">Boosting rounds</caption>
          <thead className="sticky top-0 bg-surface">
            <tr className="text-muted">
              {['Round', 'Feature', 'Rule (right side)', 'Polarity s', 'Edge r', 'Error ε', 'α', 'Train loss', 'Validation loss'].map((h) => (
                <th key={h} scope="col" className="py-1 pr-3 font-medium whitespace-nowrap">
                  {h}
                </th>
              ))}
            </tr>
          </thead>
          <tbody className="divide-y divide-border font-mono">
            {rows.map((r) => (
              <tr key={r.round} className={cn(!r.kept && 'text-muted')}>
                <td className="py-0.5 pr-3">{r.round}</td>
                <td className="py-0.5 pr-3">{r.feature}</td>
                <td className="py-0.5 pr-3">{r.rule}</td>
                <td className="py-0.5 pr-3">{r.polarity > 0 ? '+1 (fraud)' : '−1 (legitimate)'}</td>
                <td className="py-0.5 pr-3">{num(r.edge, 4)}</td>
                <td className="py-0.5 pr-3">{num(r.weightedError, 4)}</td>
                <td className="py-0.5 pr-3">{num(r.alpha, 4)}</td>
                <td className="py-0.5 pr-3">{num(r.trainLoss, 4)}</td>
                <td className="py-0.5 pr-3">{num(r.validationLoss, 4)}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      {v.roundTable.length > 30 && (
        <button type="button" className="mt-1 text-xs text-link underline underline-offset-2" onClick={() => setAll((x) => !x)}>
          {all ? 'Show the first 30 rounds' : `Show all ${v.roundTable.length} rounds`}
        </button>
      )}
    </section>
  );
}

/** One version's page: facts, evaluation charts, the rounds and the step functions. */
export function VersionScreen({ id }: { id: number }) {
  const { data: v, isPending, error } = useModelVersion(id);
  if (isPending) return <LoadingLine />;
  if (error || !v) return <p className="text-sm text-danger">This version could not be loaded.</p>;
  const e = v.evaluation;
  const curve = v.roundTable.map((r) => ({ round: r.round, trainLoss: r.trainLoss, validationLoss: r.validationLoss }));
  return (
    <div className="flex flex-col gap-3">
      <div className="flex flex-wrap items-baseline gap-3">
        <h2 className="text-base font-semibold text-text">Version {v.label}</h2>
        <Link to={`/models/versions/${v.id}/card`} className="text-sm text-link underline underline-offset-2">
          Model card (printable)
        </Link>
        {v.notes && <p className="text-xs text-muted">{v.notes}</p>}
      </div>
      <Facts v={v} />
      {!e && <p className="text-sm text-muted">This version was registered without an evaluation.</p>}
      <div className="grid gap-3 lg:grid-cols-2 2xl:grid-cols-3">
        {v.curves && (
          <PanelBoundary title="ROC curve">
            <CurveChart title="ROC curve" description={`Test rows; area ${num(e?.rocAuc)}.`} series={[{ name: v.label, points: v.curves.roc }]} xLabel="false-positive rate" yLabel="true-positive rate" diagonal />
          </PanelBoundary>
        )}
        {v.curves && (
          <PanelBoundary title="Precision-recall curve">
            <CurveChart title="Precision and recall" description={`Test rows; average precision ${num(e?.averagePrecision)}.`} series={[{ name: v.label, points: v.curves.pr }]} xLabel="recall" yLabel="precision" />
          </PanelBoundary>
        )}
        {e && (
          <PanelBoundary title="Reliability">
            <ReliabilityChart bins={e.reliability} />
          </PanelBoundary>
        )}
        {e && (
          <PanelBoundary title="Probability by class">
            <ClassHistogramChart title="Probability by class" hist={e.probabilityHistogram} format={(x) => `${Math.round(x * 100)}`} />
          </PanelBoundary>
        )}
        {e && (
          <PanelBoundary title="Margin distribution">
            <ClassHistogramChart
              title="Normalised margin by class"
              description="F(x) / Σ|α| from −1 (leans legitimate) to +1 (leans fraud): how decisive the vote is, per class."
              hist={e.normalizedMarginHistogram}
            />
          </PanelBoundary>
        )}
        {curve.length > 0 && (
          <PanelBoundary title="Loss per round">
            <LossChart curve={curve} bestRound={v.training.bestRound} />
          </PanelBoundary>
        )}
        <PanelBoundary title="Feature importance">
          <ImportanceChart importance={v.importance} />
        </PanelBoundary>
      </div>
      <PanelBoundary title="Rounds">
        <RoundTable v={v} />
      </PanelBoundary>
      <section aria-labelledby="steps-heading" className="flex flex-col gap-2">
        <h3 id="steps-heading" className="text-sm font-semibold text-text">
          Step functions
        </h3>
        <p className="text-xs text-muted">
          The model is additive: F(x) = Σ_f g_f(x_f), one step function per feature, summing that feature's stumps. A row's reason codes are g_f(x_f) minus the training
          mean of g_f.
        </p>
        <div className="grid gap-3 md:grid-cols-2 2xl:grid-cols-3">
          {v.stepFunctions.map((fn) => (
            <PanelBoundary key={fn.feature} title={`Step function of ${fn.feature}`}>
              <StepFunctionChart fn={fn} />
            </PanelBoundary>
          ))}
        </div>
      </section>
      {v.params && (
        <details className="rounded border border-border bg-surface p-3 text-xs">
          <summary className="cursor-pointer text-sm font-semibold text-text">Parameters</summary>
          <pre className="mt-1 overflow-auto font-mono text-xs text-text">{JSON.stringify(v.params, null, 2)}</pre>
        </details>
      )}
    </div>
  );
}
