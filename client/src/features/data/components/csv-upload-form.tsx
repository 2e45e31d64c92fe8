import { useId, useState, type DragEvent, type FormEvent } from 'react';
import { BACKFILL_COLUMNS, BACKFILL_MAX_BYTES, BACKFILL_MAX_LABEL, BACKFILL_REQUIRED_COLUMNS } from '@shared/api/backfill';
import { Button } from '@/components/ui/button';
import { cn } from '@/lib/cn';
import { formatBytes } from '../format';

/** What the page can tell before sending; the server checks the same and more. */
function problemWith(file: File): string | null {
  const looksCsv = file.type === 'text/csv' || file.name.toLowerCase().endsWith('.csv');
  if (!looksCsv) return `${file.name} is not a CSV file: choose a .csv file.`;
  if (file.size > BACKFILL_MAX_BYTES) return `${file.name} is ${formatBytes(file.size)}; one upload may be at most ${BACKFILL_MAX_LABEL}. Split it into parts.`;
  return null;
}

export type CsvUploadFormProps = {
  busy: boolean;
  onStart: (file: File) => void;
  onCancel: () => void;
};

/** File picker and drop zone for one CSV file, with what the file must look like. */
export function CsvUploadForm({ busy, onStart, onCancel }: CsvUploadFormProps) {
  const inputId = useId();
  const hintId = useId();
  const [file, setFile] = useState<File | null>(null);
  const [problem, setProblem] = useState<string | null>(null);
  const [dragging, setDragging] = useState(false);

  const choose = (chosen: File | null | undefined) => {
    setFile(chosen ?? null);
    setProblem(chosen ? problemWith(chosen) : null);
  };
  const onDrop = (event: DragEvent<HTMLDivElement>) => {
    event.preventDefault();
    setDragging(false);
    if (busy) return;
    const dropped = event.dataTransfer.files;
    if (dropped.length > 1) {
      // One import per file: taking the first of several silently would leave the others out unnoticed.
      setFile(null);
      setProblem(`${dropped.length} files were dropped; an import takes one file. Drop them one at a time.`);
      return;
    }
    choose(dropped[0]);
  };
  const onSubmit = (event: FormEvent) => {
    event.preventDefault();
    if (file && !problem) onStart(file);
  };

  const optional = BACKFILL_COLUMNS.filter((c) => !(BACKFILL_REQUIRED_COLUMNS as readonly string[]).includes(c));
  return (
    <form onSubmit={onSubmit} className="flex flex-col gap-3" aria-label="Upload transactions">
      <div
        onDragOver={(event) => {
          event.preventDefault();
          if (!busy) setDragging(true);
        }}
        onDragLeave={() => setDragging(false)}
        onDrop={onDrop}
        className={cn(
          'flex flex-col gap-2 rounded border border-dashed px-3 py-3',
          dragging ? 'border-focus bg-raised' : 'border-control bg-surface',
        )}
      >
        <label htmlFor={inputId} className="text-sm font-medium text-text">
          CSV file
        </label>
        <input
          id={inputId}
          type="file"
          accept=".csv,text/csv"
          disabled={busy}
          aria-describedby={hintId}
          aria-invalid={problem ? true : undefined}
          onChange={(event) => choose(event.target.files?.[0])}
          className="text-sm text-text file:mr-3 file:h-8 file:rounded file:border file:border-control file:bg-raised file:px-2 file:text-sm file:text-text"
        />
        <p id={hintId} className="text-xs text-muted">
          Choose a file or drop it here. Header row required; up to {BACKFILL_MAX_LABEL}.
          {file && !problem ? ` Selected: ${file.name}, ${formatBytes(file.size)}.` : ''}
        </p>
        {problem && (
          <p role="alert" className="text-xs text-danger">
            {problem}
          </p>
        )}
      </div>
      <p className="text-xs text-muted">Card numbers in uploaded files are tokenised on arrival and never stored.</p>
      <details className="text-xs text-muted">
        <summary className="cursor-pointer text-text">Columns the file may have</summary>
        <p className="mt-1">
          Required: <span className="font-mono">{BACKFILL_REQUIRED_COLUMNS.join(', ')}</span>.
        </p>
        <p className="mt-1">
          Optional: <span className="font-mono">{optional.join(', ')}</span>. Labels: 1, +1 or fraud; 0, -1 or legit.
          Times carry an offset (2026-11-30T14:03:00Z). Rows already stored count as duplicates, so a file can be
          uploaded again safely. Velocity features follow time order, so sort the file by occurredAt.
        </p>
      </details>
      <div className="flex gap-2">
        <Button type="submit" variant="primary" disabled={busy || !file || Boolean(problem)}>
          Start import
        </Button>
        {busy && (
          <Button type="button" onClick={onCancel}>
            Cancel upload
          </Button>
        )}
      </div>
    </form>
  );
}
