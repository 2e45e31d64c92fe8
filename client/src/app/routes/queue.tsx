import { CautionNote } from '@/components/ui/caution-note';
import { MarginBar } from '@/components/ui/margin-bar';
import { PanelBoundary } from '@/components/ui/panel-boundary';
import { RiskBadge } from '@/components/ui/risk-badge';
import { NowPanel, ScreenHeader } from '@/components/ui/screen-header';
import { RISK_LEVELS } from '@/lib/risk';

/** Reference for reading a score: every step of the scale with its range. */
function ScoreKey() {
  return (
    <section aria-labelledby="score-key-heading" className="rounded border border-border bg-surface p-3">
      <h2 id="score-key-heading" className="text-sm font-semibold text-text">
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
  return (
    <div className="flex flex-col gap-4">
      <title>Queue · Edgecase</title>
      <ScreenHeader title="Queue">
        <NowPanel>
          Not connected to cases yet. This will show how many cases are waiting for you, which are closest to
          their SLA, and how many new alerts arrived since you last looked.
        </NowPanel>
      </ScreenHeader>
      <CautionNote />
      <p className="max-w-prose text-sm text-muted">
        Coming here: the live list of open cases, riskiest first, with each case's score, its top reasons and how
        long it has waited. Claim a case, open its case file, and record a disposition (confirmed fraud,
        legitimate, inconclusive) without leaving the keyboard.
      </p>
      <PanelBoundary title="How to read a score">
        <ScoreKey />
      </PanelBoundary>
    </div>
  );
}
