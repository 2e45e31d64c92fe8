import { useId, type ReactNode } from 'react';
import { cn } from '@/lib/cn';
import {
  Bar,
  BarChart,
  CartesianGrid,
  ComposedChart,
  Line,
  LineChart,
  ReferenceLine,
  Tooltip,
  XAxis,
  YAxis,
} from 'recharts';
import type { ClassHistogram, CoverageWeek, CurvePoint, DriftReport, LabelDelay, LossPoint, ReliabilityBin, StepFunction } from '@shared/api/models';
import { PSI_FLAG } from '@shared/api/models';
import { day, num, pct } from '../utils/format';

/*
 * Charts of the Models screen. Series differ by line style or shape as well
 * as colour; every chart sits in a figure with a caption and its numbers in
 * a table behind "Numbers", for screen readers and for reading exact values.
 * No animation: the screen is read, not watched (and reduced motion holds).
 */

const tick = { fontSize: 11, fill: 'currentColor' };

/** A key entry: a line sample (text-* class, optional dash) or a swatch (bg-* class). */
export type KeyItem = { label: string; className: string; line?: boolean; dash?: string };
const compact = new Intl.NumberFormat('en-GB', { notation: 'compact', maximumSignificantDigits: 3 });
const HEIGHT = 220;

export function ChartFigure({
  title,
  description,
  children,
  numbers,
  legend,
}: {
  title: string;
  description?: ReactNode;
  children: ReactNode;
  numbers?: { columns: string[]; rows: (string | number)[][] };
  /** The series' key, drawn in the same classes as the series (so it follows the theme). */
  legend?: KeyItem[];
}) {
  const id = useId();
  return (
    <figure aria-labelledby={`${id}-title`} className="flex flex-col gap-1 rounded border border-border bg-surface p-3 break-inside-avoid">
      <figcaption>
        <span id={`${id}-title`} className="text-sm font-semibold text-text">
          {title}
        </span>
        {description && <span className="block text-xs text-muted">{description}</span>}
      </figcaption>
      <div aria-hidden="true" className="text-muted">
        {children}
        {legend && legend.length > 0 && (
          <ul className="flex flex-wrap justify-center gap-x-4 text-[11px]">
            {legend.map((k) => (
              <li key={k.label} className="flex items-center gap-1">
                {k.line ? (
                  <svg viewBox="0 0 20 6" className={cn('h-1.5 w-5', k.className)}>
                    <line x1="0" y1="3" x2="20" y2="3" stroke="currentColor" strokeWidth="2" strokeDasharray={k.dash} />
                  </svg>
                ) : (
                  <span className={cn('inline-block h-2.5 w-2.5 rounded-sm', k.className)} />
                )}
                {k.label}
              </li>
            ))}
          </ul>
        )}
      </div>
      {numbers && numbers.rows.length > 0 && (
        <details className="text-xs print:hidden">
          <summary className="cursor-pointer text-link">Numbers</summary>
          <div className="max-h-56 overflow-auto">
            <table className="mt-1 w-full text-left tabular-nums">
              <caption className="sr-only">{title}</caption>
              <thead>
                <tr className="text-muted">
                  {numbers.columns.map((c) => (
                    <th key={c} scope="col" className="py-0.5 pr-3 font-medium">
                      {c}
                    </th>
                  ))}
                </tr>
              </thead>
              <tbody>
                {numbers.rows.map((r, i) => (
                  <tr key={i} className="border-t border-border">
                    {r.map((cell, j) => (
                      <td key={j} className="py-0.5 pr-3 font-mono">
                        {cell}
                      </td>
                    ))}
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        </details>
      )}
    </figure>
  );
}

/** Keeps a table of a long series readable: at most `max` rows, evenly spaced. */
function thin<T>(xs: T[], max = 40): T[] {
  if (xs.length <= max) return xs;
  return Array.from({ length: max }, (_, k) => xs[Math.round((k * (xs.length - 1)) / (max - 1))]);
}

const DASHES = ['', '6 3', '2 3'];
// A Line's class sits on its group: the colour reaches the path through currentColor.
const STROKES = ['text-brand', 'text-risk-6', 'text-muted'];

export type CurveSeries = { name: string; points: CurvePoint[] };

/** ROC (x false-positive rate, y true-positive rate) or PR (x recall, y precision), one line per version. */
export function CurveChart({ title, description, series, xLabel, yLabel, diagonal }: { title: string; description?: ReactNode; series: CurveSeries[]; xLabel: string; yLabel: string; diagonal?: boolean }) {
  return (
    <ChartFigure
      title={title}
      description={description}
      legend={series.length > 1 ? series.map((x, i) => ({ label: x.name, className: STROKES[i % 3], line: true, dash: DASHES[i % 3] })) : undefined}
      numbers={{
        columns: ['version', xLabel, yLabel, 'at probability'],
        rows: series.flatMap((s) => thin(s.points, 25).map((p) => [s.name, num(p.x), num(p.y), pct(p.threshold)])),
      }}
    >
      <LineChart responsive style={{ width: '100%', height: HEIGHT }} margin={{ top: 8, right: 12, bottom: 16, left: 4 }}>
        <CartesianGrid strokeDasharray="2 4" className="stroke-border" />
        <XAxis type="number" dataKey="x" domain={[0, 1]} tick={tick} stroke="currentColor" label={{ value: xLabel, position: 'insideBottom', offset: -10, fontSize: 11, fill: 'currentColor' }} />
        <YAxis type="number" domain={[0, 1]} tick={tick} stroke="currentColor" width={36} />
        <Tooltip formatter={(v) => num(Number(v))} labelFormatter={(v) => `${xLabel} ${num(Number(v))}`} />
        {diagonal && <ReferenceLine segment={[{ x: 0, y: 0 }, { x: 1, y: 1 }]} strokeDasharray="3 3" className="stroke-control" />}
        {series.map((s, i) => (
          <Line
            key={s.name}
            name={s.name}
            data={s.points}
            dataKey="y"
            type="linear"
            dot={false}
            strokeWidth={2}
            strokeDasharray={DASHES[i % 3]}
            className={STROKES[i % 3]}
            stroke="currentColor"
            isAnimationActive={false}
          />
        ))}
      </LineChart>
    </ChartFigure>
  );
}

/** Exponential loss per round: training (solid) and validation (dashed). */
export function LossChart({ curve, totalRounds, bestRound, title = 'Loss per round' }: { curve: LossPoint[]; totalRounds?: number; bestRound?: number; title?: string }) {
  const hasValidation = curve.some((p) => p.validationLoss !== null);
  return (
    <ChartFigure
      title={title}
      description="Exponential loss after each boosting round: training (solid) and validation (dashed)."
      legend={[
        { label: 'training', className: 'text-brand', line: true },
        ...(hasValidation ? [{ label: 'validation', className: 'text-risk-6', line: true, dash: '6 3' }] : []),
      ]}
      numbers={{ columns: ['round', 'training loss', 'validation loss'], rows: thin(curve).map((p) => [p.round, num(p.trainLoss, 4), num(p.validationLoss, 4)]) }}
    >
      <LineChart responsive data={curve} style={{ width: '100%', height: HEIGHT }} margin={{ top: 8, right: 12, bottom: 16, left: 4 }}>
        <CartesianGrid strokeDasharray="2 4" className="stroke-border" />
        <XAxis type="number" dataKey="round" domain={[0, totalRounds ?? 'dataMax']} tick={tick} stroke="currentColor" allowDecimals={false} label={{ value: 'round', position: 'insideBottom', offset: -10, fontSize: 11, fill: 'currentColor' }} />
        <YAxis type="number" domain={['auto', 'auto']} tick={tick} stroke="currentColor" width={44} tickFormatter={(v: number) => v.toFixed(2)} />
        <Tooltip formatter={(v) => num(Number(v), 4)} labelFormatter={(v) => `round ${v}`} />
        {bestRound ? <ReferenceLine x={bestRound} strokeDasharray="3 3" className="stroke-control" label={{ value: 'kept', fontSize: 10, fill: 'currentColor' }} /> : null}
        <Line name="training" dataKey="trainLoss" dot={false} strokeWidth={2} className="text-brand" stroke="currentColor" isAnimationActive={false} />
        {hasValidation && <Line name="validation" dataKey="validationLoss" dot={false} strokeWidth={2} strokeDasharray="6 3" className="text-risk-6" stroke="currentColor" isAnimationActive={false} />}
      </LineChart>
    </ChartFigure>
  );
}

/** A histogram by class, each class as its share of its own rows (fraud is rare; raw counts would hide it). */
export function ClassHistogramChart({ title, description, hist, format = (x: number) => num(x, 2) }: { title: string; description?: ReactNode; hist: ClassHistogram; format?: (x: number) => string }) {
  const totalF = hist.fraud.reduce((a, b) => a + b, 0) || 1;
  const totalL = hist.legitimate.reduce((a, b) => a + b, 0) || 1;
  const data = hist.fraud.map((f, i) => ({
    bin: `${format(hist.edges[i])}–${format(hist.edges[i + 1])}`,
    fraud: f / totalF,
    legitimate: hist.legitimate[i] / totalL,
    nf: f,
    nl: hist.legitimate[i],
  }));
  return (
    <ChartFigure
      title={title}
      description={description ?? 'Share of each class per bin: fraud (dark) and legitimate (light).'}
      legend={[
        { label: 'legitimate', className: 'bg-control' },
        { label: 'fraud', className: 'bg-risk-6' },
      ]}
      numbers={{ columns: ['bin', 'fraud rows', 'legitimate rows'], rows: data.map((d) => [d.bin, d.nf, d.nl]) }}
    >
      <BarChart responsive data={data} style={{ width: '100%', height: HEIGHT }} margin={{ top: 8, right: 12, bottom: 4, left: 4 }} barGap={0}>
        <CartesianGrid strokeDasharray="2 4" className="stroke-border" vertical={false} />
        <XAxis dataKey="bin" tick={{ ...tick, fontSize: 9 }} stroke="currentColor" interval="preserveStartEnd" />
        <YAxis tick={tick} stroke="currentColor" width={40} tickFormatter={(v: number) => `${Math.round(v * 100)}%`} />
        <Tooltip formatter={(v) => pct(Number(v))} />
        <Bar name="legitimate" dataKey="legitimate" className="fill-control" isAnimationActive={false} />
        <Bar name="fraud" dataKey="fraud" className="fill-risk-6" isAnimationActive={false} />
      </BarChart>
    </ChartFigure>
  );
}

/** Reliability: mean predicted probability against the observed fraud rate per bin; the diagonal is perfect calibration. */
export function ReliabilityChart({ bins }: { bins: ReliabilityBin[] }) {
  const data = bins.filter((b) => b.count > 0 && b.meanPredicted !== null).map((b) => ({ x: b.meanPredicted!, y: b.observedRate!, count: b.count }));
  return (
    <ChartFigure
      title="Reliability"
      description="Observed fraud rate against the predicted probability, per probability bin; on the diagonal the probabilities mean what they say."
      numbers={{ columns: ['bin', 'rows', 'mean predicted', 'observed'], rows: bins.map((b) => [`${pct(b.lower, 0)}–${pct(b.upper, 0)}`, b.count, pct(b.meanPredicted), pct(b.observedRate)]) }}
    >
      <LineChart responsive data={data} style={{ width: '100%', height: HEIGHT }} margin={{ top: 8, right: 12, bottom: 16, left: 4 }}>
        <CartesianGrid strokeDasharray="2 4" className="stroke-border" />
        <XAxis type="number" dataKey="x" domain={[0, 1]} tick={tick} stroke="currentColor" label={{ value: 'predicted', position: 'insideBottom', offset: -10, fontSize: 11, fill: 'currentColor' }} />
        <YAxis type="number" domain={[0, 1]} tick={tick} stroke="currentColor" width={36} />
        <ReferenceLine segment={[{ x: 0, y: 0 }, { x: 1, y: 1 }]} strokeDasharray="3 3" className="stroke-control" />
        <Tooltip formatter={(v) => pct(Number(v))} />
        <Line dataKey="y" name="observed" strokeWidth={2} className="text-brand" stroke="currentColor" dot={{ r: 3 }} isAnimationActive={false} />
      </LineChart>
    </ChartFigure>
  );
}

/** Sum of |alpha| per feature, largest first. */
export function ImportanceChart({ importance }: { importance: { feature: string; importance: number; share: number; stumps: number }[] }) {
  const data = importance.slice(0, 15);
  return (
    <ChartFigure
      title="Feature importance"
      description="Sum of |α| over each feature's stumps, as a share of the total."
      numbers={{ columns: ['feature', 'share', 'Σ|α|', 'stumps'], rows: importance.map((f) => [f.feature, pct(f.share), num(f.importance), f.stumps]) }}
    >
      <BarChart responsive layout="vertical" data={data} style={{ width: '100%', height: Math.max(120, data.length * 20 + 30) }} margin={{ top: 4, right: 12, bottom: 4, left: 4 }}>
        <CartesianGrid strokeDasharray="2 4" className="stroke-border" horizontal={false} />
        <XAxis type="number" tick={tick} stroke="currentColor" tickFormatter={(v: number) => `${Math.round(v * 100)}%`} />
        <YAxis type="category" dataKey="feature" tick={tick} stroke="currentColor" width={150} interval={0} />
        <Tooltip formatter={(v) => pct(Number(v))} />
        <Bar dataKey="share" name="share" className="fill-brand" isAnimationActive={false} />
      </BarChart>
    </ChartFigure>
  );
}

/** One feature's step function g_f: its contribution to F as a function of the raw value (and when missing). */
export function StepFunctionChart({ fn }: { fn: StepFunction }) {
  if (fn.kind === 'categorical') {
    const data = fn.levels.map((l) => ({ label: l.label, value: l.value }));
    return (
      <ChartFigure
        title={fn.feature}
        description={`g(x) by category; training mean ${num(fn.mean)}.`}
        numbers={{ columns: ['category', 'g(x)'], rows: data.map((d) => [d.label, num(d.value)]) }}
      >
        <BarChart responsive data={data} style={{ width: '100%', height: 160 }} margin={{ top: 8, right: 12, bottom: 4, left: 4 }}>
          <CartesianGrid strokeDasharray="2 4" className="stroke-border" vertical={false} />
          <XAxis dataKey="label" tick={{ ...tick, fontSize: 9 }} stroke="currentColor" interval={0} />
          <YAxis tick={tick} stroke="currentColor" width={40} tickFormatter={(v: number) => v.toFixed(1)} />
          <ReferenceLine y={0} className="stroke-control" />
          <Tooltip formatter={(v) => num(Number(v))} />
          <Bar dataKey="value" name="g(x)" className="fill-brand" isAnimationActive={false} />
        </BarChart>
      </ChartFigure>
    );
  }
  // Steps: value[j] holds on (cuts[j-1], cuts[j]]; draw each step from its left cut (the first starts a little before the first cut).
  const span = fn.cuts.length > 1 ? fn.cuts[fn.cuts.length - 1] - fn.cuts[0] : Math.abs(fn.cuts[0] ?? 1) || 1;
  const left = (fn.cuts[0] ?? 0) - span * 0.1;
  const right = (fn.cuts[fn.cuts.length - 1] ?? 0) + span * 0.1;
  const data = [{ x: left, g: fn.values[0] }, ...fn.cuts.map((c, j) => ({ x: c, g: fn.values[j + 1] })), { x: right, g: fn.values[fn.values.length - 1] }];
  return (
    <ChartFigure
      title={fn.feature}
      description={`g(x) against the raw value; missing values get ${num(fn.missing)}; training mean ${num(fn.mean)}.`}
      numbers={{
        columns: ['interval', 'g(x)'],
        rows: [
          ...fn.values.map((v, j) => [j === 0 ? `≤ ${num(fn.cuts[0], 2)}` : j === fn.cuts.length ? `> ${num(fn.cuts[j - 1], 2)}` : `(${num(fn.cuts[j - 1], 2)}, ${num(fn.cuts[j], 2)}]`, num(v)]),
          ['missing', num(fn.missing)],
        ],
      }}
    >
      <LineChart responsive data={data} style={{ width: '100%', height: 160 }} margin={{ top: 8, right: 12, bottom: 4, left: 4 }}>
        <CartesianGrid strokeDasharray="2 4" className="stroke-border" />
        <XAxis type="number" dataKey="x" domain={[left, right]} tick={tick} stroke="currentColor" tickFormatter={(v: number) => compact.format(v)} />
        <YAxis tick={tick} stroke="currentColor" width={40} tickFormatter={(v: number) => v.toFixed(1)} />
        <ReferenceLine y={0} className="stroke-control" />
        <Tooltip formatter={(v) => num(Number(v))} labelFormatter={(v) => `x = ${num(Number(v), 2)}`} />
        <Line type="stepAfter" dataKey="g" name="g(x)" strokeWidth={2} dot={false} className="text-brand" stroke="currentColor" isAnimationActive={false} />
      </LineChart>
    </ChartFigure>
  );
}

/** PSI of the score and the largest feature PSI per daily report, with the watch (0.1) and act (0.25) lines. */
export function PsiHistoryChart({ reports }: { reports: DriftReport[] }) {
  const data = reports.map((r) => ({ at: day(r.windowTo), score: r.score.psi, maxFeature: Math.max(0, ...r.features.map((f) => f.psi)), version: r.modelVersion.label }));
  return (
    <ChartFigure
      title="PSI over time"
      description={`Score (solid) and the most shifted feature (dashed) against the champion's training rows; above ${PSI_FLAG} is flagged.`}
      legend={[
        { label: 'score', className: 'text-brand', line: true },
        { label: 'largest feature', className: 'text-risk-6', line: true, dash: '6 3' },
      ]}
      numbers={{ columns: ['day', 'version', 'score PSI', 'largest feature PSI'], rows: data.map((d) => [d.at, d.version, num(d.score), num(d.maxFeature)]) }}
    >
      <LineChart responsive data={data} style={{ width: '100%', height: HEIGHT }} margin={{ top: 8, right: 12, bottom: 4, left: 4 }}>
        <CartesianGrid strokeDasharray="2 4" className="stroke-border" />
        <XAxis dataKey="at" tick={tick} stroke="currentColor" />
        <YAxis tick={tick} stroke="currentColor" width={40} domain={[0, (max: number) => Math.max(0.3, max)]} tickFormatter={(v: number) => v.toFixed(2)} />
        <ReferenceLine y={0.1} strokeDasharray="2 2" className="stroke-control" label={{ value: 'watch', fontSize: 10, fill: 'currentColor', position: 'insideTopLeft' }} />
        <ReferenceLine y={PSI_FLAG} strokeDasharray="4 2" className="stroke-danger" label={{ value: 'act', fontSize: 10, fill: 'currentColor', position: 'insideTopLeft' }} />
        <Tooltip formatter={(v) => num(Number(v))} />
        <Line name="score" dataKey="score" strokeWidth={2} className="text-brand" stroke="currentColor" dot={{ r: 2 }} isAnimationActive={false} />
        <Line name="largest feature" dataKey="maxFeature" strokeWidth={2} strokeDasharray="6 3" className="text-risk-6" stroke="currentColor" dot={{ r: 2 }} isAnimationActive={false} />
      </LineChart>
    </ChartFigure>
  );
}

/** Labelled transactions per week (fraud and legitimate stacked) and the share labelled. */
export function CoverageChart({ weeks }: { weeks: CoverageWeek[] }) {
  const data = weeks.map((w) => ({ ...w, week: day(w.weekStart) }));
  return (
    <ChartFigure
      title="Label coverage by week"
      description="Labelled transactions per week of the transaction: fraud (dark) on legitimate (light); the line is the share of all transactions that carry a label."
      legend={[
        { label: 'legitimate', className: 'bg-control' },
        { label: 'fraud', className: 'bg-risk-6' },
        { label: 'share labelled', className: 'text-brand', line: true },
      ]}
      numbers={{ columns: ['week of', 'transactions', 'labelled', 'fraud', 'legitimate', 'share'], rows: weeks.map((w) => [day(w.weekStart), w.transactions, w.labelled, w.fraud, w.legitimate, pct(w.share)]) }}
    >
      <ComposedChart responsive data={data} style={{ width: '100%', height: HEIGHT }} margin={{ top: 8, right: 4, bottom: 4, left: 4 }}>
        <CartesianGrid strokeDasharray="2 4" className="stroke-border" vertical={false} />
        <XAxis dataKey="week" tick={{ ...tick, fontSize: 9 }} stroke="currentColor" />
        <YAxis yAxisId="n" tick={tick} stroke="currentColor" width={48} />
        <YAxis yAxisId="share" orientation="right" domain={[0, 1]} tick={tick} stroke="currentColor" width={40} tickFormatter={(v: number) => `${Math.round(v * 100)}%`} />
        <Tooltip />
        <Bar yAxisId="n" stackId="l" dataKey="legitimate" name="legitimate" className="fill-control" isAnimationActive={false} />
        <Bar yAxisId="n" stackId="l" dataKey="fraud" name="fraud" className="fill-risk-6" isAnimationActive={false} />
        <Line yAxisId="share" dataKey="share" name="share labelled" strokeWidth={2} className="text-brand" stroke="currentColor" dot={{ r: 2 }} isAnimationActive={false} />
      </ComposedChart>
    </ChartFigure>
  );
}

/** Days from transaction to fraud report, stacked by source. */
export function DelayChart({ delay }: { delay: LabelDelay }) {
  const data = delay.bins.map((b) => ({ ...b, range: b.toDays === -1 ? `${b.fromDays}+ d` : `${b.fromDays}–${b.toDays} d` }));
  return (
    <ChartFigure
      title="Label delay"
      description={`Fraud labels reported since ${day(delay.since)}, by days from the transaction: dispositions (light), chargebacks (dark), other sources (grey). Median ${delay.medianDays ?? '–'} d, 90th percentile ${delay.p90Days ?? '–'} d.`}
      numbers={{ columns: ['days', 'disposition', 'chargeback', 'other'], rows: data.map((d) => [d.range, d.disposition, d.chargeback, d.other]) }}
      legend={[
        { label: 'disposition', className: 'bg-risk-2' },
        { label: 'chargeback', className: 'bg-risk-6' },
        { label: 'other', className: 'bg-control' },
      ]}
    >
      <BarChart responsive data={data} style={{ width: '100%', height: HEIGHT }} margin={{ top: 8, right: 12, bottom: 4, left: 4 }}>
        <CartesianGrid strokeDasharray="2 4" className="stroke-border" vertical={false} />
        <XAxis dataKey="range" tick={{ ...tick, fontSize: 9 }} stroke="currentColor" interval={0} />
        <YAxis tick={tick} stroke="currentColor" width={44} allowDecimals={false} />
        <Tooltip />
        <Bar stackId="d" dataKey="disposition" name="disposition" className="fill-risk-2" isAnimationActive={false} />
        <Bar stackId="d" dataKey="chargeback" name="chargeback" className="fill-risk-6" isAnimationActive={false} />
        <Bar stackId="d" dataKey="other" name="other" className="fill-control" isAnimationActive={false} />
      </BarChart>
    </ChartFigure>
  );
}
