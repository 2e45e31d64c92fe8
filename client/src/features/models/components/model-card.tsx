import type { ReactNode } from 'react';
import { Link } from 'react-router';
import { FEATURES } from '@shared/features/definitions';
import { MODEL_CARD_CAUTIONS, MODEL_ROLE_LABELS, type ModelVersionDetail } from '@shared/api/models';
import { Button } from '@/components/ui/button';
import { LoadingLine } from '@/components/ui/spinner';
import { formatDateTime } from '@/lib/time';
import { useModelVersion } from '../api/get-model-version';
import { count, day, duration, num, pct, windowText } from '../utils/format';
import { CurveChart } from './charts';

// On paper only the card shows: the app's header, the Models tabs and buttons go.
const PRINT_CSS = `
@media print {
  @page { margin: 16mm; }
  html, body { background: #fff !important; color: #000 !important; }
  body header:not(.model-card header), a[href="#main"], nav { display: none !important; }
  main { max-width: none !important; padding: 0 !important; }
  .model-card { border: none !important; box-shadow: none !important; }
  .model-card section { break-inside: avoid; }
}`;

const featureLabel = (name: string) => FEATURES.find((f) => f.name === name)?.label ?? name;

function Metrics({ v }: { v: ModelVersionDetail }) {
  const e = v.evaluation;
  const rows: [string, string, string][] = [
    ['PR AUC (average precision)', num(e?.averagePrecision), 'Area under precision against recall; fraud is rare, so this is the headline.'],
    ['ROC AUC', num(e?.rocAuc), 'Chance that a fraud row scores above a legitimate one.'],
    ['Brier score', num(e?.brier, 4), 'Mean squared error of the probability (lower is better).'],
    [
      `Precision at ${e?.alertBudget?.dailyBudget ?? '–'} alerts a day`,
      pct(e?.alertBudget?.precision),
      'Share of the top-scored transactions per day that were fraud.',
    ],
    [`Recall at the same budget`, pct(e?.alertBudget?.recall), 'Share of fraud among those top-scored transactions.'],
    ['Money caught at the budget', pct(e?.alertBudget?.amountRecall), 'Share of fraud amounts in the alerted transactions.'],
  ];
  return (
    <table className="w-full text-left text-sm tabular-nums">
      <caption className="sr-only">Test metrics</caption>
      <tbody className="divide-y divide-border">
        {rows.map(([k, val, what]) => (
          <tr key={k}>
            <th scope="row" className="py-1 pr-3 font-medium">
              {k}
            </th>
            <td className="py-1 pr-3 font-mono">{val}</td>
            <td className="py-1 text-xs text-muted">{what}</td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}

/**
 * The model card of one version: what it is for, what it was trained on, how
 * it did on newer held-out rows, what it cannot know, and the cautions for
 * anyone acting on its scores. Prints as a plain page (the browser's print
 * dialog can save it as PDF).
 */
/** A titled part of the card, named by its heading for assistive technology. */
function CardSection({ id, title, children }: { id: string; title: string; children: ReactNode }) {
  return (
    <section aria-labelledby={id}>
      <h2 id={id} className="text-base font-semibold">
        {title}
      </h2>
      {children}
    </section>
  );
}

export function ModelCard({ id }: { id: number }) {
  const { data: v, isPending, error } = useModelVersion(id);
  if (isPending) return <LoadingLine />;
  if (error || !v) return <p className="text-sm text-danger">This version could not be loaded.</p>;
  const e = v.evaluation;
  const top = v.importance.slice(0, 6);
  return (
    <article className="model-card mx-auto flex max-w-4xl flex-col gap-4 rounded border border-border bg-surface p-6 text-text" aria-labelledby="card-title">
      <style>{PRINT_CSS}</style>
      <div className="flex items-center gap-2 print:hidden">
        <Link to={`/models/versions/${v.id}`} className="text-sm text-link underline underline-offset-2">
          Back to the version
        </Link>
        <Button size="sm" className="ml-auto" onClick={() => window.print()}>
          Print or save as PDF
        </Button>
      </div>
      <header>
        <p className="text-xs tracking-wide text-muted uppercase">Model card · Edgecase</p>
        <h1 id="card-title" className="text-xl font-semibold">
          Fraud score {v.label}
        </h1>
        <p className="text-sm text-muted">
          {MODEL_ROLE_LABELS[v.role]} · registered {formatDateTime(v.createdAt)}
          {v.promotedAt ? ` · champion since ${formatDateTime(v.promotedAt)}` : ''} · printed {day(new Date().toISOString())}
        </p>
      </header>

      <CardSection id="purpose" title="Purpose">
        <p className="text-sm">
          Scores each card transaction as it arrives with a calibrated probability that it is fraud, so the riskiest become alerts for the fraud operations team to
          investigate. It ranks and explains; it does not decide. Each score comes with reason codes: the features that moved it most, in raw units.
        </p>
        <p className="mt-1 text-sm">
          Method: {v.training.bestRound} boosted decision stumps (AdaBoost as coordinate descent on the exponential loss, shrinkage {v.training.shrinkage}),
          class-weighted start, Platt scaling fitted on the validation rows{v.calibration ? ` (a = ${num(v.calibration.a)}, b = ${num(v.calibration.b)})` : ''}.
        </p>
      </CardSection>

      <CardSection id="data" title="Data">
        <ul className="list-disc pl-5 text-sm">
          <li>Transactions from {windowText(v.dataFrom, v.dataTo)}; the window ends a label delay before training ({String(v.params?.labelDelayDays ?? '–')} days).</li>
          <li>
            {count(v.counts?.rows)} rows, {count(v.counts?.fraud)} fraud ({pct(v.counts ? v.counts.fraud / Math.max(1, v.counts.rows) : null, 2)}); {count(v.counts?.labelled)} carry a label, {count(v.counts?.presumedLegitimate)} are
            unlabelled and counted as legitimate.
          </li>
          <li>
            Split in time order: training {count(v.counts?.train)} rows{v.windows ? ` (${windowText(v.windows.train[0], v.windows.train[1])})` : ''}, validation {count(v.counts?.validation)}
            {v.windows ? ` (${windowText(v.windows.validation[0], v.windows.validation[1])})` : ''} for early stopping and calibration, test {count(v.counts?.test)}
            {v.windows ? ` (${windowText(v.windows.test[0], v.windows.test[1])})` : ''} for the figures below.
          </li>
          <li>Features: {v.features.map((f) => featureLabel(f.name)).join(', ')}. No card number is a feature.</li>
          <li>Training took {duration(v.trainingSeconds)}; {v.training.roundsRun} rounds ran, {v.training.bestRound} kept ({v.training.stoppedBy}).</li>
        </ul>
      </CardSection>

      <CardSection id="metrics" title="How it did on newer held-out rows">
        {e ? <Metrics v={v} /> : <p className="text-sm text-muted">No evaluation was stored with this version.</p>}
        {v.curves && (
          <div className="mt-2 grid gap-3 sm:grid-cols-2">
            <CurveChart title="Precision and recall" series={[{ name: v.label, points: v.curves.pr }]} xLabel="recall" yLabel="precision" />
            <CurveChart title="ROC curve" series={[{ name: v.label, points: v.curves.roc }]} xLabel="false-positive rate" yLabel="true-positive rate" diagonal />
          </div>
        )}
        <p className="mt-2 text-sm">Strongest features (share of Σ|α|): {top.map((f) => `${featureLabel(f.feature)} ${pct(f.share, 0)}`).join(', ')}.</p>
      </CardSection>

      <CardSection id="limits" title="Known limits">
        <ul className="list-disc pl-5 text-sm">
          <li>One threshold per feature per stump: interactions between features are not modelled, only added up.</li>
          <li>Categories seen fewer than five times in training share one "other" value; a new merchant category or country is read as "other".</li>
          <li>Velocity features depend on the card's recent history held by the scoring service; a card's first transactions have little of it.</li>
          <li>The test period is short ({count(e?.n)} rows, {count(e?.fraud)} fraud): the figures carry sampling error, more so for precision at the budget.</li>
        </ul>
      </CardSection>

      <CardSection id="cautions" title="Cautions">
        <ul className="list-disc pl-5 text-sm">
          {MODEL_CARD_CAUTIONS.map((c) => (
            <li key={c}>{c}</li>
          ))}
        </ul>
      </CardSection>
    </article>
  );
}
