import { useId, useMemo, useState } from 'react';
import type { AlertDetail } from '@shared/api/cases';
import { explainRow, scoreRow, type Explanation, type Model, type Row, type Score } from '@shared/model/index';
import { Button } from '@/components/ui/button';
import { MarginBar } from '@/components/ui/margin-bar';
import { RiskBadge } from '@/components/ui/risk-badge';
import { LoadingLine } from '@/components/ui/spinner';
import { cn } from '@/lib/cn';
import { formatMargin } from '@/lib/format';
import { useScoringModel } from '../api/get-scoring-model';
import { featureDescription, featureLabel, featureUnit, FLAG_FEATURES } from '../utils/feature-labels';

type Value = number | string | null;

const REASON_ROWS = 8;

function evaluate(model: Model, row: Row): { score: Score; explanation: Explanation } | { error: string } {
  try {
    return { score: scoreRow(model, row), explanation: explainRow(model, row) };
  } catch (error) {
    return { error: error instanceof Error ? error.message : 'The row could not be scored.' };
  }
}

function shown(value: Value | undefined): string {
  if (value === null || value === undefined || value === '') return 'missing';
  return String(value);
}

/** A numeric field's text as the model's input: empty is missing; anything else must be a finite number. */
function parseNumeric(text: string): { value: Value } | { invalid: true } {
  if (text.trim() === '') return { value: null };
  const x = Number(text);
  return Number.isFinite(x) ? { value: x } : { invalid: true };
}

const inputClass = 'h-7 w-full rounded border border-control bg-surface px-1.5 text-xs text-text aria-[invalid=true]:border-danger';

function FeatureField({
  model,
  name,
  kind,
  original,
  draft,
  used,
  onDraft,
}: {
  model: Model;
  name: string;
  kind: 'numeric' | 'categorical';
  original: Value;
  draft: string | undefined;
  used: boolean;
  onDraft: (text: string | undefined) => void;
}) {
  const id = useId();
  const unit = featureUnit(name);
  const text = draft ?? (original === null || original === undefined ? '' : String(original));
  const edited = draft !== undefined && draft !== (original === null || original === undefined ? '' : String(original));
  const invalid = kind === 'numeric' && 'invalid' in parseNumeric(text);
  const bins = model.binning.features.find((b) => b.name === name);
  const categories = bins?.kind === 'categorical' ? bins.categories : [];

  let control;
  if (kind === 'numeric' && FLAG_FEATURES.has(name)) {
    control = (
      <select id={id} className={inputClass} value={text} onChange={(event) => onDraft(event.target.value)}>
        <option value="1">yes</option>
        <option value="0">no</option>
        <option value="">missing</option>
      </select>
    );
  } else if (kind === 'numeric') {
    control = (
      <input
        id={id}
        type="text"
        inputMode="decimal"
        className={cn(inputClass, 'font-mono tabular-nums')}
        value={text}
        aria-invalid={invalid || undefined}
        onChange={(event) => onDraft(event.target.value)}
      />
    );
  } else {
    control = (
      <>
        <input
          id={id}
          type="text"
          list={`${id}-options`}
          className={cn(inputClass, 'font-mono')}
          value={text}
          spellCheck={false}
          onChange={(event) => onDraft(event.target.value)}
        />
        <datalist id={`${id}-options`}>
          {categories.map((c) => (
            <option key={c} value={c} />
          ))}
        </datalist>
      </>
    );
  }

  return (
    <div className={cn('flex flex-col gap-0.5', !used && 'opacity-70')}>
      <label htmlFor={id} className="flex items-baseline justify-between gap-1 text-xs" title={featureDescription(name)}>
        <span className={cn(edited ? 'font-semibold text-text' : 'text-muted')}>
          {featureLabel(name)}
          {unit && ` (${unit})`}
        </span>
        {edited ? (
          <button type="button" className="text-[0.6875rem] text-link underline-offset-2 hover:underline" onClick={() => onDraft(undefined)}>
            was {shown(original)} · undo
          </button>
        ) : (
          !used && <span className="text-[0.6875rem] text-muted">not used</span>
        )}
      </label>
      {control}
      {invalid && <span className="text-[0.6875rem] text-danger">Enter a number, or leave empty for missing.</span>}
    </div>
  );
}

function ScoreSummary({ label, score, outputLabel }: { label: string; score: Score; outputLabel: string }) {
  return (
    <div className="flex flex-col gap-0.5">
      <span className="text-xs text-muted">{label}</span>
      <span className="inline-flex flex-wrap items-center gap-2">
        <output aria-label={outputLabel}>
          <RiskBadge probability={score.probability} />
        </output>
        <MarginBar margin={score.normalizedMargin} />
      </span>
    </div>
  );
}

function WhatIfEditor({ model, alert }: { model: Model; alert: AlertDetail }) {
  const [drafts, setDrafts] = useState<Record<string, string>>({});
  const original = alert.features;

  const row = useMemo(() => {
    const next: Row = { ...original };
    for (const [name, text] of Object.entries(drafts)) {
      const spec = model.features.find((f) => f.name === name);
      if (!spec) continue;
      if (spec.kind === 'categorical') next[name] = text.trim() === '' ? null : text.trim();
      else {
        const parsed = parseNumeric(text);
        if ('value' in parsed) next[name] = parsed.value;
      }
    }
    return next;
  }, [drafts, model, original]);

  const before = useMemo(() => evaluate(model, original), [model, original]);
  const after = useMemo(() => evaluate(model, row), [model, row]);
  const usedFeatures = useMemo(() => new Set(model.stumps.map((s) => s.feature)), [model]);
  const editedCount = model.features.filter((f) => drafts[f.name] !== undefined && row[f.name] !== original[f.name]).length;

  const setDraft = (name: string, text: string | undefined) =>
    setDrafts((current) => {
      const next = { ...current };
      if (text === undefined) delete next[name];
      else next[name] = text;
      return next;
    });

  if ('error' in before) return <p role="alert" className="text-sm text-danger">This alert's features cannot be scored by its model: {before.error}</p>;

  const beforeByFeature = new Map(before.explanation.contributions.map((c) => [c.feature, c]));
  const changes = 'error' in after ? [] : after.explanation.contributions.slice(0, REASON_ROWS);
  const delta = 'error' in after ? 0 : (after.score.probability - before.score.probability) * 100;

  return (
    <div className="flex flex-col gap-3">
      <p className="text-xs text-muted">
        Change any input and the score is recomputed here in your browser with model <span className="font-medium text-text">{alert.model.label}</span>
        , the same one that scored the alert. Nothing is saved or sent.
      </p>
      <form onSubmit={(event) => event.preventDefault()} aria-label="What-if inputs" className="grid grid-cols-[repeat(auto-fill,minmax(9.5rem,1fr))] gap-x-3 gap-y-2">
        {model.features.map((f) => (
          <FeatureField
            key={f.name}
            model={model}
            name={f.name}
            kind={f.kind}
            original={original[f.name] ?? null}
            draft={drafts[f.name]}
            used={usedFeatures.has(f.name)}
            onDraft={(text) => setDraft(f.name, text)}
          />
        ))}
      </form>
      <div role="status" aria-label="What-if result" className="flex flex-wrap items-end gap-x-6 gap-y-2 rounded border border-border bg-raised px-3 py-2">
        <ScoreSummary label="As scored" score={before.score} outputLabel="Scored probability" />
        {'error' in after ? (
          <p className="text-sm text-danger">{after.error}</p>
        ) : (
          <>
            <ScoreSummary label={editedCount ? `What-if (${editedCount} change${editedCount === 1 ? '' : 's'})` : 'What-if (no changes yet)'} score={after.score} outputLabel="What-if probability" />
            <span className="text-xs text-muted">
              Change <span className="font-mono text-text tabular-nums">{`${delta >= 0 ? '+' : '−'}${Math.abs(delta).toFixed(1)}`}</span> points · margin{' '}
              <span className="font-mono text-text">{formatMargin(before.score.normalizedMargin)}</span> →{' '}
              <span className="font-mono text-text">{formatMargin(after.score.normalizedMargin)}</span>
            </span>
          </>
        )}
        <Button size="sm" variant="ghost" className="ml-auto" onClick={() => setDrafts({})} disabled={Object.keys(drafts).length === 0}>
          Reset all
        </Button>
      </div>
      {changes.length > 0 && (
        <table className="w-full text-xs">
          <caption className="mb-1 text-left text-xs font-medium text-muted">How the reasons change (largest first)</caption>
          <thead>
            <tr className="text-left text-muted">
              <th scope="col" className="py-1 pr-2 font-medium">Reason with the what-if inputs</th>
              <th scope="col" className="py-1 pr-2 text-right font-medium">Before</th>
              <th scope="col" className="py-1 pr-2 text-right font-medium">After</th>
              <th scope="col" className="py-1 text-right font-medium">Change</th>
            </tr>
          </thead>
          <tbody className="divide-y divide-border">
            {changes.map((c) => {
              const was = beforeByFeature.get(c.feature)?.contribution ?? 0;
              const moved = c.contribution - was;
              return (
                <tr key={c.feature}>
                  <td className={cn('py-1 pr-2 font-mono', Math.abs(moved) > 1e-9 && 'font-semibold')}>{c.text}</td>
                  <td className="py-1 pr-2 text-right font-mono tabular-nums">{formatMargin(was)}</td>
                  <td className="py-1 pr-2 text-right font-mono tabular-nums">{formatMargin(c.contribution)}</td>
                  <td className="py-1 text-right font-mono tabular-nums">{Math.abs(moved) > 1e-9 ? formatMargin(moved) : 'same'}</td>
                </tr>
              );
            })}
          </tbody>
        </table>
      )}
    </div>
  );
}

/** What-if: edit the alert's inputs and see the model's answer at once, computed in the browser. */
export function WhatIfPanel({ alert }: { alert: AlertDetail }) {
  const model = useScoringModel(alert.model.id);
  if (model.isPending) return <LoadingLine label="Loading the model that scored this alert…" />;
  if (model.isError) {
    return (
      <p role="alert" className="text-sm text-danger">
        The model that scored this alert could not be loaded: {model.error.message}
      </p>
    );
  }
  return <WhatIfEditor key={alert.alertId} model={model.data} alert={alert} />;
}
