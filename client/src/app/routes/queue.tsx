import { MarginBar } from '@/components/ui/margin-bar';
import { PanelBoundary } from '@/components/ui/panel-boundary';
import { RiskBadge } from '@/components/ui/risk-badge';
import { QueueScreen } from '@/features/queue/components/queue-screen';
import { RISK_LEVELS } from '@/lib/risk';
import { useSessionUser } from '../session';

/** Reference for reading a score: every step of the scale with its range. */
function ScoreKey() {
  return (
    <section aria-labelledby="score-key-heading">
      <h2 id="score-key-heading" className="sr-only">
        How to read a score
      </h2>
      <p className="mt-1 text-xs text-muted">
        The score is the model's calibrated probability that the transaction is fraud. The bar beside it is the
        normalised margin, from −1 (leans legitimate) to +1 (leans fraud).
      </p>
      <table className="mt-2 text-xs">
        <caption className="sr-only">Risk steps</caption>
        <thead>
          <tr className="text-left text-muted">
            <th scope="col" className="py-1 pr-4 font-medium">Step</th>
            <th scope="col" className="py-1 pr-4 font-medium">Probability from</th>
            <th scope="col" className="py-1 font-medium">Shown as</th>
          </tr>
        </thead>
        <tbody className="divide-y divide-border">
          {RISK_LEVELS.map((level) => (
            <tr key={level.step}>
              <td className="py-1 pr-4 font-mono">{level.step}</td>
              <td className="py-1 pr-4 font-mono">{(level.from * 100).toFixed(0)} %</td>
              <td className="py-1">
                <RiskBadge probability={Math.min(level.from + 0.02, 0.999)} />
              </td>
            </tr>
          ))}
        </tbody>
      </table>
      <p className="mt-2 flex items-center gap-2 text-xs text-muted">
        Margin examples: <MarginBar margin={-0.6} /> <MarginBar margin={0.1} /> <MarginBar margin={0.85} />
      </p>
    </section>
  );
}

export function QueueRoute() {
  const user = useSessionUser();
  return (
    <div className="flex flex-col gap-4">
      <QueueScreen meId={user.id} />
      <details className="group rounded border border-border bg-surface">
        <summary className="cursor-pointer px-3 py-2 text-sm font-medium text-text">How to read a score</summary>
        <div className="px-3 pb-3">
          <PanelBoundary title="How to read a score">
            <ScoreKey />
          </PanelBoundary>
        </div>
      </details>
    </div>
  );
}
