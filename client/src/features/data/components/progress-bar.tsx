import { useId } from 'react';

/** A labelled bar with its percentage written out: the number carries the meaning, the bar only shows it. */
export function ProgressBar({ label, value, detail }: { label: string; value: number | null; detail?: string }) {
  const id = useId();
  return (
    <div className="flex flex-col gap-1">
      <div className="flex items-baseline justify-between gap-2 text-xs">
        <span id={id} className="font-medium text-text">
          {label}
        </span>
        <span className="text-muted">
          {value === null ? 'waiting' : `${value} %`}
          {detail ? ` · ${detail}` : ''}
        </span>
      </div>
      <div
        role="progressbar"
        aria-labelledby={id}
        aria-valuemin={0}
        aria-valuemax={100}
        aria-valuenow={value ?? undefined}
        aria-valuetext={value === null ? 'waiting' : `${value} %`}
        className="h-2 overflow-hidden rounded-full border border-control bg-raised"
      >
        <div className="h-full bg-muted motion-safe:transition-[width]" style={{ width: `${value ?? 0}%` }} />
      </div>
    </div>
  );
}
