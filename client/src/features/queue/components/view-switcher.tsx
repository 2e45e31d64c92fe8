import { KeyHint } from '@/components/ui/key-hint';
import { cn } from '@/lib/cn';
import type { QueueView } from '../utils/queue-search';

export const VIEWS: { view: QueueView; label: string; key: string }[] = [
  { view: 'all', label: 'All', key: 'a' },
  { view: 'mine', label: 'Mine', key: 'm' },
  { view: 'unassigned', label: 'Unassigned', key: 'u' },
];

export function ViewSwitcher({ view, onChange }: { view: QueueView; onChange: (view: QueueView) => void }) {
  return (
    <div role="group" aria-label="View" className="inline-flex items-center rounded border border-border bg-surface p-0.5">
      {VIEWS.map((option) => (
        <button
          key={option.view}
          type="button"
          aria-pressed={view === option.view}
          onClick={() => onChange(option.view)}
          className={cn(
            'inline-flex h-7 items-center gap-1.5 rounded px-2 text-xs',
            view === option.view ? 'bg-raised font-semibold text-text' : 'text-muted hover:text-text',
          )}
        >
          {option.label}
          <KeyHint keys={option.key} />
        </button>
      ))}
    </div>
  );
}
