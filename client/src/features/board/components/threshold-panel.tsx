import { useId, useState } from 'react';
import { CartesianGrid, Legend, Line, LineChart, ReferenceDot, ReferenceLine, Tooltip, XAxis, YAxis } from 'recharts';
import { pointAt, thresholdForCapacity, type ThresholdCurve, type ThresholdPoint } from '@shared/api/supervision';
import { Button } from '@/components/ui/button';
import { CautionNote } from '@/components/ui/caution-note';
import { Dialog } from '@/components/ui/dialog';
import { LoadingLine } from '@/components/ui/spinner';
import { TextField } from '@/components/ui/text-field';
import { formatProbability } from '@/lib/format';
import { useReducedMotion } from '@/lib/motion';
import { useSettings } from '../api/get-settings';
import { useThresholdCurve } from '../api/get-threshold-curve';
import { useSaveThreshold } from '../api/save-threshold';

const tick = { fontSize: 11, fill: 'currentColor' };
const SOURCE_LABEL: Record<ThresholdCurve['precisionSource'], string> = {
  holdout_histogram: "the champion's held-out evaluation",
  labelled_scores: 'labelled transactions the champion scored (no held-out histogram stored)',
  none: 'nothing yet: no evaluation and no labels',
};

const perDay = (n: number) => (n >= 100 ? Math.round(n).toLocaleString('en') : n.toFixed(1));
const share = (x: number | null) => (x === null ? 'unknown' : `${(x * 100).toFixed(1)} %`);

export type ThresholdChoice = { threshold: number; point: ThresholdPoint | null; fits: boolean };

/** What the entry means on the curve: a capacity picks the lowest threshold that fits it; a threshold is taken as typed. */
export function chooseThreshold(curve: ThresholdCurve, mode: 'capacity' | 'threshold', value: number): ThresholdChoice | null {
  if (!Number.isFinite(value) || value <= 0) return null;
  if (mode === 'capacity') {
    const p = thresholdForCapacity(curve.points, value);
    if (p) return { threshold: p.threshold, point: p, fits: true };
    const top = curve.points[curve.points.length - 1];
    return { threshold: top.threshold, point: top, fits: false };
  }
  const t = value / 100;
  if (t < 0.001 || t > 0.999) return null;
  return { threshold: t, point: pointAt(curve.points, t), fits: true };
}

function CurveChart({ curve, chosen }: { curve: ThresholdCurve; chosen: ThresholdChoice | null }) {
  const reducedMotion = useReducedMotion();
  const data = curve.points.map((p) => ({
    t: p.threshold * 100,
    cases: p.casesPerDay,
    alerts: p.alertsPerDay,
    precision: p.precision === null ? null : p.precision * 100,
    recall: p.recall === null ? null : p.recall * 100,
  }));
  return (
    <div aria-hidden="true" className="text-muted">
      <LineChart responsive style={{ width: '100%', height: 260 }} data={data} margin={{ top: 8, right: 8, bottom: 4, left: 0 }}>
        <CartesianGrid strokeDasharray="2 4" className="stroke-border" />
        <XAxis type="number" dataKey="t" domain={[0, 100]} tick={tick} stroke="currentColor" unit=" %" tickCount={11} />
        <YAxis yAxisId="day" tick={tick} stroke="currentColor" width={44} />
        <YAxis yAxisId="share" orientation="right" domain={[0, 100]} tick={tick} stroke="currentColor" unit=" %" width={44} />
        <Tooltip formatter={(v) => (typeof v === 'number' ? v.toFixed(1) : v)} labelFormatter={(t) => `threshold ${Number(t).toFixed(0)} %`} />
        <Legend wrapperStyle={{ fontSize: 11 }} />
        <Line yAxisId="day" dataKey="cases" name="Cases a day" stroke="var(--ec-text)" strokeWidth={2} dot={false} isAnimationActive={!reducedMotion} />
        <Line yAxisId="day" dataKey="alerts" name="Alerts a day" stroke="var(--ec-control)" strokeDasharray="4 2" dot={false} isAnimationActive={!reducedMotion} />
        <Line yAxisId="share" dataKey="precision" name="Precision (right)" stroke="var(--ec-link)" strokeWidth={2} strokeDasharray="1 3" dot={false} connectNulls isAnimationActive={!reducedMotion} />
        <Line yAxisId="share" dataKey="recall" name="Recall (right)" stroke="var(--ec-ok)" strokeWidth={2} strokeDasharray="8 3" dot={false} connectNulls isAnimationActive={!reducedMotion} />
        <ReferenceLine yAxisId="day" x={curve.current * 100} stroke="var(--ec-muted)" strokeDasharray="3 3" label={{ value: 'now', position: 'top', fontSize: 11, fill: 'currentColor' }} />
        {chosen && (
          <>
            <ReferenceLine yAxisId="day" x={chosen.threshold * 100} stroke="var(--ec-brand)" strokeWidth={2} label={{ value: 'chosen', position: 'insideTopLeft', fontSize: 11, fill: 'currentColor' }} />
            {chosen.point && <ReferenceDot yAxisId="day" x={chosen.point.threshold * 100} y={chosen.point.casesPerDay} r={5} fill="var(--ec-brand)" stroke="var(--ec-surface)" />}
          </>
        )}
      </LineChart>
    </div>
  );
}

/**
 * The alert threshold, set from what the team can work: enter the cases a
 * day the team can handle (or a threshold), see the expected alerts and
 * cases a day from recent traffic and the precision and recall there, and
 * save. The scoring worker alerts on the saved threshold from the next
 * transaction on.
 */
export function ThresholdPanel() {
  const settings = useSettings();
  const [days, setDays] = useState(14);
  const curve = useThresholdCurve(days);
  const [mode, setMode] = useState<'capacity' | 'threshold'>('capacity');
  // null until the reader types: the field then starts from what is saved.
  const [raw, setRaw] = useState<string | null>(null);
  const [confirming, setConfirming] = useState(false);
  const save = useSaveThreshold();
  const name = useId();

  if (curve.isPending || settings.isPending) return <LoadingLine label="Loading the threshold curve…" />;
  if (curve.isError) return <p role="alert" className="text-sm text-danger">The curve could not be computed: {curve.error.message}</p>;
  if (settings.isError) return <p role="alert" className="text-sm text-danger">The settings could not be loaded: {settings.error.message}</p>;

  const c = curve.data;
  const s = settings.data;
  const entered = raw === null ? (mode === 'capacity' ? (s.dailyCapacity ?? NaN) : s.threshold * 100) : raw.trim() === '' ? NaN : Number(raw);
  const chosen = chooseThreshold(c, mode, entered);
  const now = pointAt(c.points, c.current);
  const unchanged = !chosen || (Math.abs(chosen.threshold - s.threshold) < 1e-9 && (mode === 'threshold' || Math.round(entered) === s.dailyCapacity));

  return (
    <div className="flex flex-col gap-4">
      <section aria-labelledby="threshold-heading" className="flex flex-col gap-3 rounded border border-border bg-surface p-3">
        <h2 id="threshold-heading" className="text-sm font-semibold text-text">
          Alert threshold from capacity
        </h2>
        <p className="text-xs text-muted">
          Now alerting at {formatProbability(s.threshold)}
          {now && `: about ${perDay(now.casesPerDay)} cases and ${perDay(now.alertsPerDay)} alerts a day`}
          {s.dailyCapacity !== null && `, for a capacity of ${s.dailyCapacity} cases a day`}.
        </p>
        <fieldset className="flex flex-wrap items-end gap-4">
          <legend className="sr-only">Set the threshold by</legend>
          <label className="flex items-center gap-1.5 text-sm">
            <input type="radio" name={name} checked={mode === 'capacity'} onChange={() => {
                setMode('capacity');
                setRaw(null);
              }} />
            Cases the team can work a day
          </label>
          <label className="flex items-center gap-1.5 text-sm">
            <input type="radio" name={name} checked={mode === 'threshold'} onChange={() => {
                setMode('threshold');
                setRaw(null);
              }} />
            A probability threshold
          </label>
          <TextField
            className="w-48"
            label={mode === 'capacity' ? 'Cases a day' : 'Threshold (%)'}
            type="number"
            inputMode="decimal"
            min={mode === 'capacity' ? 1 : 0.1}
            max={mode === 'capacity' ? undefined : 99.9}
            step={mode === 'capacity' ? 1 : 0.1}
            value={raw ?? (Number.isFinite(entered) ? String(mode === 'capacity' ? entered : Number(entered.toFixed(1))) : '')}
            onChange={(e) => setRaw(e.target.value)}
          />
          <label className="flex flex-col gap-1 text-sm font-medium">
            Recent traffic
            <select className="h-9 rounded border border-control bg-surface px-2 font-normal" value={days} onChange={(e) => setDays(Number(e.target.value))}>
              {[7, 14, 30].map((d) => (
                <option key={d} value={d}>
                  last {d} days
                </option>
              ))}
            </select>
          </label>
        </fieldset>

        <div role="status" aria-label="Where this lands" className="text-sm">
          {chosen?.point ? (
            <p>
              At <strong className="font-mono">{formatProbability(chosen.threshold)}</strong>: about <strong>{perDay(chosen.point.casesPerDay)}</strong> cases and{' '}
              {perDay(chosen.point.alertsPerDay)} alerts a day; precision <strong>{share(chosen.point.precision)}</strong>, recall <strong>{share(chosen.point.recall)}</strong>
              {mode === 'threshold' && Math.abs(chosen.point.threshold - chosen.threshold) > 1e-9 && ` (figures at ${formatProbability(chosen.point.threshold)}, the nearest step)`}.
              {!chosen.fits && ' Even the highest threshold on the curve opens more cases than that.'}
            </p>
          ) : (
            <p className="text-muted">Enter a number to see where it lands.</p>
          )}
        </div>
        <CurveChart curve={c} chosen={chosen} />
        <p className="text-xs text-muted">
          Alerts and cases a day from {c.traffic.scored.toLocaleString('en')} transactions scored over the last {c.traffic.days < 1 ? `${(c.traffic.days * 24).toFixed(1)} hours` : `${c.traffic.days.toFixed(1)} days`}
          {' '}(a case counted once per card and day). Precision and recall from {SOURCE_LABEL[c.precisionSource]}. {c.precisionNote}
        </p>
        <table className="sr-only">
          <caption>Threshold curve</caption>
          <thead>
            <tr>
              <th scope="col">Threshold</th>
              <th scope="col">Cases a day</th>
              <th scope="col">Alerts a day</th>
              <th scope="col">Precision</th>
              <th scope="col">Recall</th>
            </tr>
          </thead>
          <tbody>
            {c.points
              .filter((_, i) => i % 5 === 4)
              .map((p) => (
                <tr key={p.threshold}>
                  <th scope="row">{formatProbability(p.threshold)}</th>
                  <td>{perDay(p.casesPerDay)}</td>
                  <td>{perDay(p.alertsPerDay)}</td>
                  <td>{share(p.precision)}</td>
                  <td>{share(p.recall)}</td>
                </tr>
              ))}
          </tbody>
        </table>
        <div className="flex items-center gap-3">
          <Button variant="primary" disabled={unchanged} onClick={() => setConfirming(true)}>
            Use this threshold
          </Button>
          {save.isSuccess && (
            <p role="status" className="text-xs text-ok">
              Saved: the next transaction is scored against {formatProbability(save.data.threshold)}.
            </p>
          )}
        </div>
      </section>
      <CautionNote />
      {confirming && chosen && (
        <Dialog title="Change the alert threshold?" onClose={() => setConfirming(false)}>
          <div className="flex flex-col gap-3 text-sm">
            <p>
              From <strong className="font-mono">{formatProbability(s.threshold)}</strong> to <strong className="font-mono">{formatProbability(chosen.threshold)}</strong>.
              {now && chosen.point && ` Expected cases a day: about ${perDay(now.casesPerDay)} → ${perDay(chosen.point.casesPerDay)}.`}
            </p>
            <p className="text-xs text-muted">It applies from the next transaction scored. Cases already open stay as they are. The change is recorded in the audit log.</p>
            {save.isError && (
              <p role="alert" className="text-xs text-danger">
                {save.error.message}
              </p>
            )}
            <div className="flex justify-end gap-2">
              <Button onClick={() => setConfirming(false)}>Cancel</Button>
              <Button
                variant="primary"
                disabled={save.isPending}
                onClick={() =>
                  save.mutate(
                    { threshold: chosen.threshold, dailyCapacity: mode === 'capacity' ? Math.round(entered) : s.dailyCapacity },
                    {
                      onSuccess: () => {
                        setConfirming(false);
                        setRaw(null);
                      },
                    },
                  )
                }
              >
                Change threshold
              </Button>
            </div>
          </div>
        </Dialog>
      )}
    </div>
  );
}
