import { Bar, CartesianGrid, ComposedChart, Legend, Line, ReferenceLine, Tooltip, XAxis, YAxis } from 'recharts';
import type { AlertVolumeHour } from '@shared/api/supervision';
import { useReducedMotion } from '@/lib/motion';

const tick = { fontSize: 11, fill: 'currentColor' };
const hourOf = (iso: string) => new Date(iso).toLocaleTimeString('en-GB', { hour: '2-digit', minute: '2-digit', hourCycle: 'h23' });

/**
 * Alerts and new cases per hour over the last day, against what the team can
 * work (the daily capacity spread evenly over 24 hours: a simplification,
 * shifts are not modelled). The table holds the same numbers.
 */
export function AlertVolumeChart({ hours, perHour }: { hours: AlertVolumeHour[]; perHour: number | null }) {
  const reducedMotion = useReducedMotion();
  const data = hours.map((h) => ({ hour: hourOf(h.hour), alerts: h.alerts, cases: h.casesOpened }));
  const over = perHour === null ? 0 : hours.filter((h) => h.casesOpened > perHour).length;
  const total = hours.reduce((s, h) => s + h.alerts, 0);
  return (
    <figure className="flex flex-col gap-2">
      <figcaption className="text-xs text-muted">
        {total} alerts in the last 24 hours.{' '}
        {perHour === null
          ? 'No daily capacity set yet (Alert threshold tab).'
          : `Capacity ${perHour.toFixed(1)} cases an hour; ${over} of the last 24 hours opened more.`}
      </figcaption>
      <div aria-hidden="true" className="text-muted">
        <ComposedChart responsive style={{ width: '100%', height: 200 }} data={data} margin={{ top: 4, right: 8, bottom: 0, left: 0 }}>
          <CartesianGrid strokeDasharray="2 4" className="stroke-border" vertical={false} />
          <XAxis dataKey="hour" tick={tick} stroke="currentColor" interval={3} />
          <YAxis allowDecimals={false} tick={tick} stroke="currentColor" width={32} />
          <Tooltip cursor={false} />
          <Legend wrapperStyle={{ fontSize: 11 }} />
          <Bar dataKey="alerts" name="Alerts" fill="var(--ec-control)" isAnimationActive={!reducedMotion} />
          <Line dataKey="cases" name="New cases" type="stepAfter" stroke="var(--ec-text)" strokeWidth={2} dot={false} isAnimationActive={!reducedMotion} />
          {perHour !== null && (
            <ReferenceLine y={perHour} stroke="var(--ec-danger)" strokeDasharray="6 3" label={{ value: 'capacity', position: 'insideTopRight', fontSize: 11, fill: 'currentColor' }} />
          )}
        </ComposedChart>
      </div>
      <table className="sr-only">
        <caption>Alerts and new cases per hour{perHour === null ? '' : `, capacity ${perHour.toFixed(1)} cases an hour`}</caption>
        <thead>
          <tr>
            <th scope="col">Hour starting</th>
            <th scope="col">Alerts</th>
            <th scope="col">New cases</th>
          </tr>
        </thead>
        <tbody>
          {hours.map((h) => (
            <tr key={h.hour}>
              <th scope="row">{hourOf(h.hour)}</th>
              <td>{h.alerts}</td>
              <td>{h.casesOpened}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </figure>
  );
}
