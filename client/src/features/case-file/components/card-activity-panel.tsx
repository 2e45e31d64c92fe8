import { lazy, Suspense } from 'react';
import { Link } from 'react-router';
import { CASE_STATUS_LABELS, type ActivityItem, type RelatedCase } from '@shared/api/cases';
import { CardFragment } from '@/components/ui/card-fragment';
import { RiskBadge } from '@/components/ui/risk-badge';
import { cn } from '@/lib/cn';
import { formatMoney } from '@/lib/money';
import { formatDateTime } from '@/lib/time';
import { ACTIVITY_CHART_HEIGHT } from '../utils/chart-sizes';

// Loaded beside the case, not before it (see the reasons panel).
const ActivityChart = lazy(async () => ({ default: (await import('./activity-chart')).ActivityChart }));

const VIA_LABELS: Record<RelatedCase['via'][number], string> = { card: 'same card', device: 'same device', ip: 'same IP address' };

const number = (x: number | null, digits = 0) => (x === null ? '–' : x.toLocaleString('en', { maximumFractionDigits: digits }));

function Marker({ item }: { item: ActivityItem }) {
  if (item.inThisCase) {
    return (
      <span className="inline-flex items-center gap-1 font-semibold text-text">
        <svg aria-hidden="true" viewBox="0 0 10 10" className="h-2.5 w-2.5 fill-risk-6">
          <path d="M5 0 10 5 5 10 0 5Z" />
        </svg>
        this case
      </span>
    );
  }
  if (item.alerted) {
    return (
      <span className="inline-flex items-center gap-1 text-text">
        <svg aria-hidden="true" viewBox="0 0 10 10" className="h-2.5 w-2.5 fill-risk-3">
          <path d="M5 0 10 10H0Z" />
        </svg>
        other alert
      </span>
    );
  }
  return null;
}

/** The card's recent transactions (table and timeline), and other open cases that share its card, device or IP. */
export function CardActivityPanel({ activity, related }: { activity: ActivityItem[]; related: RelatedCase[] }) {
  const ordered = [...activity].sort((a, b) => Date.parse(b.occurredAt) - Date.parse(a.occurredAt));
  return (
    <div className="flex flex-col gap-3">
      {activity.length > 0 && (
        <div style={{ minHeight: ACTIVITY_CHART_HEIGHT }}>
          <Suspense fallback={null}>
            <ActivityChart activity={activity} />
          </Suspense>
        </div>
      )}
      {ordered.length === 0 ? (
        <p className="text-sm text-muted">No recent transactions on this card.</p>
      ) : (
        <div className="max-h-80 overflow-auto">
          <table className="w-full text-xs">
            <caption className="sr-only">Recent transactions on the card, newest first</caption>
            <thead className="sticky top-0 bg-surface">
              <tr className="text-left text-muted">
                <th scope="col" className="py-1 pr-2 font-medium">When</th>
                <th scope="col" className="py-1 pr-2 text-right font-medium">Amount</th>
                <th scope="col" className="py-1 pr-2 font-medium">Merchant</th>
                <th scope="col" className="py-1 pr-2 font-medium">Country</th>
                <th scope="col" className="py-1 pr-2 font-medium">Channel</th>
                <th scope="col" className="py-1 pr-2 text-right font-medium">From previous</th>
                <th scope="col" className="py-1 pr-2 text-right font-medium">Speed</th>
                <th scope="col" className="py-1 pr-2 font-medium">Score</th>
                <th scope="col" className="py-1 font-medium">Alert</th>
              </tr>
            </thead>
            <tbody className="divide-y divide-border">
              {ordered.map((item) => (
                <tr key={item.transactionId} className={cn(item.inThisCase && 'bg-raised font-medium')}>
                  <td className="py-1 pr-2 whitespace-nowrap">
                    <time dateTime={item.occurredAt}>{formatDateTime(item.occurredAt, { seconds: true })}</time>
                  </td>
                  <td className="py-1 pr-2 text-right font-mono whitespace-nowrap tabular-nums">{formatMoney(item.amount)}</td>
                  <td className="py-1 pr-2">
                    {item.merchantName} <span className="font-mono text-muted">{item.mcc}</span>
                  </td>
                  <td className="py-1 pr-2 font-mono">{item.country}</td>
                  <td className="py-1 pr-2 whitespace-nowrap">
                    {item.channel} · {item.cardPresent ? 'card present' : 'not present'}
                  </td>
                  <td className="py-1 pr-2 text-right font-mono tabular-nums">{item.distanceKm === null ? '–' : `${number(item.distanceKm)} km`}</td>
                  <td className="py-1 pr-2 text-right font-mono tabular-nums">{item.speedKmh === null ? '–' : `${number(item.speedKmh)} km/h`}</td>
                  <td className="py-1 pr-2">{item.probability === null ? <span className="text-muted">–</span> : <RiskBadge probability={item.probability} />}</td>
                  <td className="py-1">
                    <Marker item={item} />
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
      <section aria-label="Related open cases">
        <h3 className="text-xs font-semibold tracking-wide text-muted uppercase">Related open cases</h3>
        {related.length === 0 ? (
          <p className="mt-1 text-xs text-muted">No other open case shares this card, device or IP address.</p>
        ) : (
          <ul className="mt-1 divide-y divide-border">
            {related.map((r) => (
              <li key={r.id} className="flex flex-wrap items-center gap-x-3 gap-y-1 py-1 text-xs">
                <Link to={`/cases/${r.id}`} className="font-mono text-link underline underline-offset-2">
                  Case {r.id}
                </Link>
                <RiskBadge probability={r.probability} />
                <span>{CASE_STATUS_LABELS[r.status] ?? r.status}</span>
                <CardFragment bin={r.card.bin} last4={r.card.last4} />
                <span className="text-muted">{r.via.map((v) => VIA_LABELS[v]).join(', ')}</span>
              </li>
            ))}
          </ul>
        )}
      </section>
    </div>
  );
}
