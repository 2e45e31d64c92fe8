import { Bar, BarChart, Cell, ReferenceLine, XAxis, YAxis } from 'recharts';
import type { Reason } from '@shared/api/cases';
import { useReducedMotion } from '@/lib/motion';
import { REASON_CHART_PADDING, REASON_ROW_HEIGHT } from '../utils/chart-sizes';
import { signedContribution } from '../utils/signed';

const LABEL_CHARS = 46;

/**
 * Reason codes as signed horizontal bars in the model's own units (margin
 * contribution): right of the zero line pushes toward fraud, left pushes
 * away. Direction and the signed number carry the meaning; the two fills only
 * repeat it. The panel lists the same reasons as a table for screen readers.
 */
export function ReasonsChart({ reasons }: { reasons: Pick<Reason, 'text' | 'contribution'>[] }) {
  const reducedMotion = useReducedMotion();
  const data = reasons.map((r) => ({
    label: r.text.length > LABEL_CHARS ? `${r.text.slice(0, LABEL_CHARS - 1)}…` : r.text,
    contribution: r.contribution,
  }));
  const extent = Math.max(0.05, ...data.map((d) => Math.abs(d.contribution)));
  const domain: [number, number] = [-extent, extent];
  // Symmetric ticks, so the zero line sits in the middle and both directions read alike.
  const ticks = [-extent, -extent / 2, 0, extent / 2, extent];
  return (
    <BarChart
      layout="vertical"
      data={data}
      responsive
      style={{ width: '100%', height: data.length * REASON_ROW_HEIGHT + REASON_CHART_PADDING }}
      margin={{ top: 4, right: 12, bottom: 4, left: 4 }}
      barCategoryGap={4}
    >
      <XAxis
        type="number"
        domain={domain}
        tickFormatter={signedContribution}
        tick={{ fontSize: 11, fill: 'currentColor' }}
        stroke="currentColor"
        ticks={ticks}
      />
      <YAxis
        type="category"
        dataKey="label"
        width={360}
        interval={0}
        tick={{ fontSize: 11, fill: 'currentColor', fontFamily: '"IBM Plex Mono", ui-monospace, monospace' }}
        stroke="currentColor"
      />
      <ReferenceLine x={0} stroke="currentColor" strokeWidth={1.5} />
      <Bar dataKey="contribution" isAnimationActive={!reducedMotion}>
        {data.map((d, i) => (
          <Cell key={i} className={d.contribution >= 0 ? 'fill-risk-5' : 'fill-link'} />
        ))}
      </Bar>
    </BarChart>
  );
}
