import { lazy, Suspense } from 'react';
import type { AlertDetail } from '@shared/api/cases';
import { formatProbability } from '@/lib/format';
import { formatDateTime } from '@/lib/time';
import { signedContribution } from '../utils/signed';
import { REASON_CHART_PADDING, REASON_ROW_HEIGHT } from '../utils/chart-sizes';

// The chart library is most of this screen's code: it loads beside the case, not before it.
const ReasonsChart = lazy(async () => ({ default: (await import('./reasons-chart')).ReasonsChart }));

/** Why the chosen alert scored as it did: its stored reason codes, in raw units, with the model that scored it. */
export function ReasonsPanel({ alert }: { alert: AlertDetail }) {
  const reasons = [...alert.reasons].sort((a, b) => Math.abs(b.contribution) - Math.abs(a.contribution));
  const caption = `Reason codes, model ${alert.model.label}`;
  const height = reasons.length * REASON_ROW_HEIGHT + REASON_CHART_PADDING;
  return (
    <div className="flex flex-col gap-2">
      <p className="text-xs text-muted">
        Alert on transaction <span className="font-mono text-text">{alert.externalId}</span>, {formatDateTime(alert.occurredAt)}: scored{' '}
        <span className="font-mono text-text">{formatProbability(alert.probability)}</span> by model{' '}
        <span className="font-medium text-text">{alert.model.label}</span>. Each bar is how far one feature moved the score from the
        training average.
      </p>
      {reasons.length === 0 ? (
        <p className="text-sm text-muted">No reason codes were stored for this alert.</p>
      ) : (
        <figure className="flex flex-col gap-1">
          {/* The space is held while the chart loads, so nothing below it jumps. */}
          <div aria-hidden="true" className="text-muted" style={{ minHeight: height }}>
            <Suspense fallback={null}>
              <ReasonsChart reasons={reasons} />
            </Suspense>
          </div>
          <figcaption className="flex flex-wrap justify-between gap-2 text-xs text-muted">
            <span>← away from fraud</span>
            <span>{caption}</span>
            <span>toward fraud →</span>
          </figcaption>
          <table className="sr-only">
            <caption>{caption}</caption>
            <thead>
              <tr>
                <th scope="col">Reason</th>
                <th scope="col">Contribution</th>
              </tr>
            </thead>
            <tbody>
              {reasons.map((r, i) => (
                <tr key={i}>
                  <td>{r.text}</td>
                  <td>{signedContribution(r.contribution)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </figure>
      )}
    </div>
  );
}
