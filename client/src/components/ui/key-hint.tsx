import { cn } from '@/lib/cn';

const KEY_NAMES: Record<string, string> = { Escape: 'Esc', ' ': 'Space', ArrowUp: '↑', ArrowDown: '↓' };

/**
 * Shows a shortcut as key caps, e.g. "g q" as [g] [q]. Hidden from screen
 * readers where the surrounding control already names the action; the help
 * overlay lists the same keys as text.
 */
export function KeyHint({ keys, className, decorative = true }: { keys: string; className?: string; decorative?: boolean }) {
  const parts = keys.split(' ');
  return (
    <span className={cn('inline-flex items-center gap-0.5', className)} aria-hidden={decorative || undefined}>
      {parts.map((key, i) => (
        <kbd
          key={i}
          className="min-w-[1.25rem] rounded border border-border bg-raised px-1 text-center font-mono text-[0.6875rem] leading-4 text-muted"
        >
          {KEY_NAMES[key] ?? key}
        </kbd>
      ))}
    </span>
  );
}

/** Spoken form of a key sequence for the help overlay: "g then q". */
export function describeKeys(keys: string): string {
  return keys
    .split(' ')
    .map((key) => KEY_NAMES[key] ?? key)
    .join(' then ');
}
