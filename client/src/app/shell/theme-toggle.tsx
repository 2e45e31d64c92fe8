import { cn } from '@/lib/cn';
import { useTheme, type ThemeChoice } from '@/lib/theme';

const CHOICES: { value: ThemeChoice; label: string }[] = [
  { value: 'light', label: 'Light' },
  { value: 'dark', label: 'Dark' },
  { value: 'system', label: 'System' },
];

export function ThemeToggle() {
  const { choice, setChoice } = useTheme();
  return (
    <fieldset className="inline-flex items-center rounded border border-border p-0.5 text-xs">
      <legend className="sr-only">Theme</legend>
      {CHOICES.map((option) => (
        <label
          key={option.value}
          className={cn(
            'cursor-pointer rounded px-1.5 py-0.5 has-[:focus-visible]:outline-2 has-[:focus-visible]:outline-focus',
            choice === option.value ? 'bg-raised font-semibold text-text' : 'text-muted hover:text-text',
          )}
        >
          <input
            type="radio"
            name="theme"
            value={option.value}
            checked={choice === option.value}
            onChange={() => setChoice(option.value)}
            className="sr-only"
          />
          {option.label}
        </label>
      ))}
    </fieldset>
  );
}
