import { forwardRef, useEffect, useId, useRef, useState, type ReactNode } from 'react';
import { CASE_STATUS_LABELS, CASE_STATUSES, PRIORITIES } from '@shared/api/cases';
import { Button } from '@/components/ui/button';
import { KeyHint } from '@/components/ui/key-hint';
import { cn } from '@/lib/cn';
import { activeFilterCount, type QueueParams } from '../utils/queue-search';
import { channelLabel } from './queue-columns';

type Channel = NonNullable<QueueParams['channel']>[number];
const CHANNELS = ['pos', 'ecommerce', 'atm', 'moto', 'contactless'] as const satisfies readonly Channel[];
// Fails to compile when the contract gains a channel this list lacks.
const _everyChannel: [Exclude<Channel, (typeof CHANNELS)[number]>] extends [never] ? true : never = true;
void _everyChannel;

const PRIORITY_LABELS: Record<string, string> = { urgent: 'Urgent', high: 'High', standard: 'Standard' };

/** Deadline filters: minutes until due; 0 means already past it. */
const DUE_OPTIONS: { value: string; label: string }[] = [
  { value: '', label: 'Any deadline' },
  { value: '0', label: 'Breached' },
  { value: '15', label: 'Due within 15 min' },
  { value: '30', label: 'Due within 30 min' },
  { value: '60', label: 'Due within 1 h' },
  { value: '240', label: 'Due within 4 h' },
];

const inputClass = 'h-7 rounded border border-control bg-surface px-2 text-xs text-text aria-[invalid=true]:border-danger';

/**
 * A text input that applies its value when the person is done with it (Enter,
 * leaving the field, or a pause while typing when `applyAfterMs` is set), so
 * the queue is not refetched on every key.
 */
const ApplyInput = forwardRef<
  HTMLInputElement,
  {
    label: string;
    value: string;
    onApply: (value: string) => string | null;
    applyAfterMs?: number;
    placeholder?: string;
    width: string;
    inputMode?: 'numeric' | 'decimal' | 'text' | 'search';
    type?: 'text' | 'search';
    hint?: ReactNode;
    onEscape?: () => void;
  }
>(function ApplyInput({ label, value, onApply, applyAfterMs, placeholder, width, inputMode, type = 'text', hint, onEscape }, ref) {
  const id = useId();
  const [draft, setDraft] = useState(value);
  const [error, setError] = useState<string | null>(null);
  const [lastValue, setLastValue] = useState(value);
  if (value !== lastValue) {
    // The URL changed from elsewhere (a saved view, clearing filters): show what applies now.
    setLastValue(value);
    setDraft(value);
    setError(null);
  }
  const apply = (text: string) => {
    if (text.trim() === value) return;
    setError(onApply(text.trim()));
  };
  const applyRef = useRef(apply);
  useEffect(() => {
    applyRef.current = apply;
  });
  useEffect(() => {
    if (!applyAfterMs || draft.trim() === value) return;
    const timer = setTimeout(() => applyRef.current(draft), applyAfterMs);
    return () => clearTimeout(timer);
  }, [draft, value, applyAfterMs]);

  return (
    <div className="flex flex-col gap-0.5">
      <label htmlFor={id} className="flex items-center gap-1 text-xs font-medium text-muted">
        {label} {hint}
      </label>
      <input
        ref={ref}
        id={id}
        type={type}
        inputMode={inputMode}
        value={draft}
        placeholder={placeholder}
        spellCheck={false}
        autoComplete="off"
        aria-invalid={error ? true : undefined}
        aria-describedby={error ? `${id}-error` : undefined}
        onChange={(event) => setDraft(event.target.value)}
        onBlur={() => apply(draft)}
        onKeyDown={(event) => {
          if (event.key === 'Enter') apply(draft);
          if (event.key === 'Escape') onEscape?.();
        }}
        className={cn(inputClass, width)}
      />
      {error && (
        <p id={`${id}-error`} role="alert" className="max-w-48 text-xs text-danger">
          {error}
        </p>
      )}
    </div>
  );
});

function CheckboxMenu({
  label,
  options,
  selected,
  onToggle,
}: {
  label: string;
  options: { value: string; label: string }[];
  selected: readonly string[];
  /** One box at a time: the caller applies it to the newest list, which may be ahead of this render's. */
  onToggle: (value: string, checked: boolean) => void;
}) {
  const summary = selected.length === 0 ? 'Any' : selected.length === 1 ? options.find((o) => o.value === selected[0])?.label : `${selected.length} chosen`;
  return (
    <div className="flex flex-col gap-0.5">
      <span className="text-xs font-medium text-muted" aria-hidden="true">
        {label}
      </span>
      <details className="group relative">
        <summary
          aria-label={`${label}: ${summary}`}
          className={cn(
            inputClass,
            'flex min-w-28 cursor-pointer list-none items-center justify-between gap-2 [&::-webkit-details-marker]:hidden',
            selected.length > 0 && 'font-medium',
          )}
        >
          <span>{summary}</span>
          <svg aria-hidden="true" viewBox="0 0 10 6" className="h-1.5 w-2.5 fill-current group-open:rotate-180">
            <path d="M0 0h10L5 6z" />
          </svg>
        </summary>
        <fieldset className="absolute z-20 mt-1 flex min-w-44 flex-col gap-0.5 rounded border border-border bg-surface p-2 shadow-md">
          <legend className="sr-only">{label}</legend>
          {options.map((option) => (
            <label key={option.value} className="flex items-center gap-2 rounded px-1 py-0.5 text-xs text-text hover:bg-raised">
              <input
                type="checkbox"
                checked={selected.includes(option.value)}
                onChange={(event) => onToggle(option.value, event.target.checked)}
              />
              {option.label}
            </label>
          ))}
        </fieldset>
      </details>
    </div>
  );
}

function parseList(text: string, pattern: RegExp, transform: (s: string) => string): string[] | null {
  const items = text
    .split(/[\s,]+/)
    .map((s) => transform(s.trim()))
    .filter(Boolean);
  return items.every((s) => pattern.test(s)) ? items : null;
}

function parseNumber(text: string, { min, max }: { min: number; max: number }): number | undefined | null {
  if (text === '') return undefined;
  const value = Number(text);
  return Number.isFinite(value) && value >= min && value <= max ? value : null;
}

const PROBABILITY_BOUNDS = [
  { key: 'minProbability', label: 'Min. probability %' },
  { key: 'maxProbability', label: 'Max. probability %' },
] as const;

/** Percent in the field, a probability (0..1) in the query. */
const percentOf = (p: number | undefined) => (p === undefined ? '' : String(Math.round(p * 1000) / 10));

type ListKey = 'status' | 'priority' | 'channel';

export type QueueFiltersProps = {
  params: QueueParams;
  /** A function form computes the change from the newest parameters (quick successive clicks). */
  onChange: (changes: Partial<QueueParams> | ((current: QueueParams) => Partial<QueueParams>)) => void;
  onClear: () => void;
  /** Escape in a filter field goes back to the list. */
  onLeave: () => void;
};

export const QueueFilters = forwardRef<HTMLInputElement, QueueFiltersProps>(function QueueFilters(
  { params, onChange, onClear, onLeave },
  searchRef,
) {
  const filters = activeFilterCount(params);
  const toggle = (key: ListKey) => (value: string, checked: boolean) =>
    onChange((current) => {
      const list = (current[key] ?? []) as string[];
      const next = checked ? [...list.filter((v) => v !== value), value] : list.filter((v) => v !== value);
      return { [key]: next.length ? next : undefined } as Partial<QueueParams>;
    });
  return (
    <section aria-label="Filters" className="flex flex-wrap items-end gap-x-3 gap-y-2">
      <ApplyInput
        ref={searchRef}
        type="search"
        label="Search"
        hint={<KeyHint keys="/" />}
        placeholder="Case id, BIN or last four"
        width="w-48"
        value={params.q ?? ''}
        applyAfterMs={350}
        onEscape={onLeave}
        onApply={(text) => {
          if (text.length > 20) return 'At most 20 characters.';
          onChange({ q: text || undefined });
          return null;
        }}
      />
      <CheckboxMenu
        label="Status"
        options={CASE_STATUSES.map((s) => ({ value: s, label: CASE_STATUS_LABELS[s] }))}
        selected={params.status ?? []}
        onToggle={toggle('status')}
      />
      <CheckboxMenu
        label="Priority"
        options={PRIORITIES.map((p) => ({ value: p, label: PRIORITY_LABELS[p] }))}
        selected={params.priority ?? []}
        onToggle={toggle('priority')}
      />
      <CheckboxMenu
        label="Channel"
        options={CHANNELS.map((c) => ({ value: c, label: channelLabel(c) }))}
        selected={params.channel ?? []}
        onToggle={toggle('channel')}
      />
      {PROBABILITY_BOUNDS.map(({ key, label }) => (
        <ApplyInput
          key={key}
          onEscape={onLeave}
          label={label}
          width="w-20"
          inputMode="decimal"
          value={percentOf(params[key])}
          onApply={(text) => {
            const value = parseNumber(text, { min: 0, max: 100 });
            if (value === null) return 'A percentage from 0 to 100.';
            onChange({ [key]: value === undefined ? undefined : value / 100 });
            return null;
          }}
        />
      ))}
      <ApplyInput
        onEscape={onLeave}
        label="Min. at risk"
        width="w-24"
        inputMode="decimal"
        value={params.minAmount === undefined ? '' : String(params.minAmount)}
        onApply={(text) => {
          const value = parseNumber(text, { min: 0, max: Number.MAX_SAFE_INTEGER });
          if (value === null) return 'An amount of 0 or more, in major units.';
          onChange({ minAmount: value });
          return null;
        }}
      />
      <ApplyInput
        onEscape={onLeave}
        label="Merchant category"
        width="w-28"
        inputMode="numeric"
        placeholder="e.g. 5967, 7995"
        value={(params.mcc ?? []).join(', ')}
        onApply={(text) => {
          const list = parseList(text, /^\d{4}$/, (s) => s);
          if (!list) return 'Four-digit codes, separated by commas.';
          onChange({ mcc: list.length ? list : undefined });
          return null;
        }}
      />
      <ApplyInput
        onEscape={onLeave}
        label="Country"
        width="w-24"
        placeholder="e.g. GB, FR"
        value={(params.country ?? []).join(', ')}
        onApply={(text) => {
          const list = parseList(text, /^[A-Z]{2}$/, (s) => s.toUpperCase());
          if (!list) return 'Two-letter country codes, separated by commas.';
          onChange({ country: list.length ? list : undefined });
          return null;
        }}
      />
      <div className="flex flex-col gap-0.5">
        <label htmlFor="queue-due-filter" className="text-xs font-medium text-muted">
          SLA
        </label>
        <select
          id="queue-due-filter"
          className={inputClass}
          value={params.dueWithinMinutes === undefined ? '' : String(params.dueWithinMinutes)}
          onChange={(event) => onChange({ dueWithinMinutes: event.target.value === '' ? undefined : Number(event.target.value) })}
        >
          {DUE_OPTIONS.some((o) => o.value === String(params.dueWithinMinutes ?? '')) ? null : (
            <option value={String(params.dueWithinMinutes)}>Due within {params.dueWithinMinutes} min</option>
          )}
          {DUE_OPTIONS.map((option) => (
            <option key={option.value} value={option.value}>
              {option.label}
            </option>
          ))}
        </select>
      </div>
      <Button size="sm" variant="ghost" onClick={onClear} disabled={filters === 0}>
        Clear filters{filters > 0 ? ` (${filters})` : ''}
      </Button>
    </section>
  );
});
