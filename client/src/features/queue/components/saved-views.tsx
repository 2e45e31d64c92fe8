import { useId, useState } from 'react';
import type { SavedView } from '@shared/api/cases';
import { Button } from '@/components/ui/button';
import { cn } from '@/lib/cn';
import { useSavedViews } from '../api/get-saved-views';
import { useSaveSavedViews } from '../api/save-saved-views';
import { savedQueryOf, showsSavedView, type QueueParams } from '../utils/queue-search';
import { HIDEABLE_COLUMNS } from './queue-columns';

const controlClass = 'h-7 rounded border border-control bg-surface px-2 text-xs text-text';

/** This person's saved views: pick one, save what is on screen under a name, or delete the one shown. */
export function SavedViewsControl({
  params,
  visibleColumns,
  onApply,
}: {
  params: QueueParams;
  visibleColumns: string[];
  onApply: (view: SavedView) => void;
}) {
  const selectId = useId();
  const nameId = useId();
  const views = useSavedViews();
  const save = useSaveSavedViews();
  const [naming, setNaming] = useState(false);
  const [name, setName] = useState('');
  const list = views.data?.views ?? [];
  const current = list.find((v) => showsSavedView(params, v.query));

  if (views.isError) {
    return <p className="text-xs text-muted">Saved views are unavailable just now.</p>;
  }

  const store = (next: SavedView[]) => save.mutate({ ...views.data, views: next });

  const onSave = (event: React.FormEvent) => {
    event.preventDefault();
    const trimmed = name.trim();
    if (!trimmed) return;
    const view: SavedView = { name: trimmed.slice(0, 60), query: savedQueryOf(params), columns: visibleColumns };
    store([...list.filter((v) => v.name !== view.name), view]);
    setNaming(false);
    setName('');
  };

  return (
    <div className="flex flex-wrap items-end gap-2">
      <div className="flex flex-col gap-0.5">
        <label htmlFor={selectId} className="text-xs font-medium text-muted">
          Saved view
        </label>
        <select
          id={selectId}
          className={controlClass}
          value={current?.name ?? ''}
          disabled={!views.data}
          onChange={(event) => {
            const view = list.find((v) => v.name === event.target.value);
            if (view) onApply(view);
          }}
        >
          <option value="">{list.length ? 'None chosen' : 'None saved yet'}</option>
          {list.map((view) => (
            <option key={view.name} value={view.name}>
              {view.name}
            </option>
          ))}
        </select>
      </div>
      {naming ? (
        <form onSubmit={onSave} className="flex items-end gap-1">
          <div className="flex flex-col gap-0.5">
            <label htmlFor={nameId} className="text-xs font-medium text-muted">
              Name for this view
            </label>
            <input
              id={nameId}
              autoFocus
              maxLength={60}
              value={name}
              onChange={(event) => setName(event.target.value)}
              onKeyDown={(event) => event.key === 'Escape' && setNaming(false)}
              className={cn(controlClass, 'w-40')}
            />
          </div>
          <Button size="sm" type="submit" variant="primary" disabled={!name.trim() || save.isPending}>
            Save
          </Button>
          <Button size="sm" variant="ghost" onClick={() => setNaming(false)}>
            Cancel
          </Button>
        </form>
      ) : (
        <Button size="sm" onClick={() => setNaming(true)} disabled={!views.data || list.length >= 30}>
          Save view…
        </Button>
      )}
      {current && !naming && (
        <Button size="sm" variant="ghost" onClick={() => store(list.filter((v) => v.name !== current.name))} disabled={save.isPending}>
          Delete “{current.name}”
        </Button>
      )}
      {save.isError && (
        <p role="alert" className="text-xs text-danger">
          Could not save your views. {save.error.message}
        </p>
      )}
    </div>
  );
}

/** Which columns show; the choice is kept with the person's saved views. */
export function ColumnPicker({ visible, onChange }: { visible: string[]; onChange: (columns: string[]) => void }) {
  return (
    <details className="group relative">
      <summary className={cn(controlClass, 'flex cursor-pointer list-none items-center gap-1 [&::-webkit-details-marker]:hidden')}>
        Columns ({visible.length}/{HIDEABLE_COLUMNS.length})
      </summary>
      <fieldset className="absolute right-0 z-20 mt-1 flex min-w-44 flex-col gap-0.5 rounded border border-border bg-surface p-2 shadow-md">
        <legend className="sr-only">Visible columns</legend>
        {HIDEABLE_COLUMNS.map((column) => (
          <label key={column.id} className="flex items-center gap-2 rounded px-1 py-0.5 text-xs text-text hover:bg-raised">
            <input
              type="checkbox"
              checked={visible.includes(column.id)}
              onChange={(event) =>
                onChange(
                  HIDEABLE_COLUMNS.map((c) => c.id).filter((id) => (id === column.id ? event.target.checked : visible.includes(id))),
                )
              }
            />
            {column.label}
          </label>
        ))}
      </fieldset>
    </details>
  );
}
