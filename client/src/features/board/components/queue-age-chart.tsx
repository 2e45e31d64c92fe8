import { Bar, BarChart, CartesianGrid, Legend, Tooltip, XAxis, YAxis } from 'recharts';
import type { QueueAgeBucket } from '@shared/api/supervision';
import { useReducedMotion } from '@/lib/motion';

const tick = { fontSize: 11, fill: 'currentColor' };

/**
 * How long open cases have waited since they opened, split into within and
 * past their SLA. Past-SLA bars are hatched as well as darker, so the split
 * reads without colour; the table under the chart holds the same numbers.
 */
export function QueueAgeChart({ buckets }: { buckets: QueueAgeBucket[] }) {
  const reducedMotion = useReducedMotion();
  const data = buckets.map((b) => ({ label: b.label, within: b.count - b.breached, past: b.breached }));
  const total = buckets.reduce((s, b) => s + b.count, 0);
  const past = buckets.reduce((s, b) => s + b.breached, 0);
  return (
    <figure className="flex flex-col gap-2">
      <figcaption className="text-xs text-muted">
        {total} open {total === 1 ? 'case' : 'cases'}, {past} past SLA, by time since the case opened.
      </figcaption>
      <div aria-hidden="true" className="text-muted">
        <BarChart responsive style={{ width: '100%', height: 200 }} data={data} margin={{ top: 4, right: 8, bottom: 0, left: 0 }}>
          <defs>
            <pattern id="queue-age-past" width="6" height="6" patternUnits="userSpaceOnUse" patternTransform="rotate(45)">
              <rect width="6" height="6" className="fill-danger" />
              <line x1="0" y1="0" x2="0" y2="6" className="stroke-surface" strokeWidth="2" />
            </pattern>
          </defs>
          <CartesianGrid strokeDasharray="2 4" className="stroke-border" vertical={false} />
          <XAxis dataKey="label" tick={tick} stroke="currentColor" interval={0} />
          <YAxis allowDecimals={false} tick={tick} stroke="currentColor" width={32} />
          <Tooltip cursor={false} />
          <Legend wrapperStyle={{ fontSize: 11 }} />
          <Bar dataKey="within" name="Within SLA" stackId="age" fill="var(--ec-control)" isAnimationActive={!reducedMotion} />
          <Bar dataKey="past" name="Past SLA (hatched)" stackId="age" fill="url(#queue-age-past)" isAnimationActive={!reducedMotion} />
        </BarChart>
      </div>
      <table className="sr-only">
        <caption>Open cases by age</caption>
        <thead>
          <tr>
            <th scope="col">Waiting</th>
            <th scope="col">Cases</th>
            <th scope="col">Past SLA</th>
          </tr>
        </thead>
        <tbody>
          {buckets.map((b) => (
            <tr key={b.label}>
              <th scope="row">{b.label}</th>
              <td>{b.count}</td>
              <td>{b.breached}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </figure>
  );
}
