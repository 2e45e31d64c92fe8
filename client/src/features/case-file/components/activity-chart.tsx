import { CartesianGrid, Legend, Scatter, ScatterChart, Tooltip, XAxis, YAxis } from 'recharts';
import type { ActivityItem } from '@shared/api/cases';
import { useReducedMotion } from '@/lib/motion';
import { moneyToMajor } from '@/lib/money';
import { formatDateTime } from '@/lib/time';
import { ACTIVITY_CHART_HEIGHT } from '../utils/chart-sizes';

type Point = { at: number; amount: number; label: string };

function toPoint(item: ActivityItem): Point {
  return { at: Date.parse(item.occurredAt), amount: moneyToMajor(item.amount), label: `${item.merchantName}, ${item.amount.currency}` };
}

const tick = { fontSize: 11, fill: 'currentColor' };

/**
 * The card's recent transactions over time, amount up the side. This case's
 * alerts are diamonds, other alerts triangles, the rest small circles: shape
 * tells them apart, colour only echoes it. The table beside it holds the same
 * facts for screen readers and keyboard users.
 */
export function ActivityChart({ activity }: { activity: ActivityItem[] }) {
  const reducedMotion = useReducedMotion();
  const thisCase = activity.filter((a) => a.inThisCase).map(toPoint);
  const otherAlerts = activity.filter((a) => a.alerted && !a.inThisCase).map(toPoint);
  const plain = activity.filter((a) => !a.alerted && !a.inThisCase).map(toPoint);
  return (
    <div aria-hidden="true" className="text-muted">
      <ScatterChart responsive style={{ width: '100%', height: ACTIVITY_CHART_HEIGHT }} margin={{ top: 8, right: 12, bottom: 4, left: 4 }}>
        <CartesianGrid strokeDasharray="2 4" className="stroke-border" />
        <XAxis
          type="number"
          dataKey="at"
          scale="time"
          domain={['dataMin', 'dataMax']}
          tickFormatter={(t: number) => formatDateTime(new Date(t).toISOString())}
          tick={tick}
          stroke="currentColor"
          tickCount={5}
        />
        <YAxis type="number" dataKey="amount" tick={tick} stroke="currentColor" width={56} name="Amount" />
        <Tooltip
          cursor={false}
          formatter={(value, name) => (name === 'at' ? formatDateTime(new Date(Number(value)).toISOString()) : value)}
          labelFormatter={() => ''}
        />
        <Legend wrapperStyle={{ fontSize: 11 }} />
        <Scatter name="Other transactions" data={plain} shape="circle" className="fill-control" isAnimationActive={!reducedMotion} />
        <Scatter name="Other alerts" data={otherAlerts} shape="triangle" className="fill-risk-3 stroke-text" isAnimationActive={!reducedMotion} />
        <Scatter name="This case's alerts" data={thisCase} shape="diamond" className="fill-risk-6 stroke-text" isAnimationActive={!reducedMotion} />
      </ScatterChart>
    </div>
  );
}
