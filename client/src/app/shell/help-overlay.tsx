import { useEffect, useId, useRef, useState } from 'react';
import { Button } from '@/components/ui/button';
import { describeKeys, KeyHint } from '@/components/ui/key-hint';
import { useHotkey, useRegisteredHotkeys, type Hotkey } from '@/lib/hotkeys';

function groupByName(hotkeys: Hotkey[]): [string, Hotkey[]][] {
  const groups = new Map<string, Hotkey[]>();
  for (const hotkey of hotkeys) groups.set(hotkey.group, [...(groups.get(hotkey.group) ?? []), hotkey]);
  return [...groups.entries()];
}

/** The "Shortcuts" button and the overlay it opens; `?` toggles it from anywhere but a text field. */
export function HelpOverlay() {
  const [open, setOpen] = useState(false);
  const titleId = useId();
  const dialogRef = useRef<HTMLDivElement>(null);
  const closeRef = useRef<HTMLButtonElement>(null);
  const returnFocusRef = useRef<HTMLElement | null>(null);
  const hotkeys = useRegisteredHotkeys();

  useHotkey('?', () => setOpen((wasOpen) => !wasOpen), { description: 'Show or hide this list of shortcuts' });
  useHotkey('Escape', () => setOpen(false), { description: 'Close this list', enabled: open });

  useEffect(() => {
    if (!open) return;
    returnFocusRef.current = document.activeElement instanceof HTMLElement ? document.activeElement : null;
    closeRef.current?.focus();
    return () => returnFocusRef.current?.focus();
  }, [open]);

  // Keep Tab inside the dialog while it is open.
  const onKeyDown = (event: React.KeyboardEvent) => {
    if (event.key !== 'Tab' || !dialogRef.current) return;
    const focusable = dialogRef.current.querySelectorAll<HTMLElement>('button, [href], [tabindex]:not([tabindex="-1"])');
    const first = focusable[0];
    const last = focusable[focusable.length - 1];
    if (event.shiftKey && document.activeElement === first) {
      event.preventDefault();
      last?.focus();
    } else if (!event.shiftKey && document.activeElement === last) {
      event.preventDefault();
      first?.focus();
    }
  };

  return (
    <>
      <Button size="sm" variant="ghost" onClick={() => setOpen(true)} aria-haspopup="dialog">
        Shortcuts <KeyHint keys="?" />
      </Button>
      {open && (
        <div className="fixed inset-0 z-40 flex items-start justify-center bg-black/40 px-4 pt-[10vh]" onClick={() => setOpen(false)}>
          <div
            ref={dialogRef}
            role="dialog"
            aria-modal="true"
            aria-labelledby={titleId}
            onKeyDown={onKeyDown}
            onClick={(event) => event.stopPropagation()}
            className="w-full max-w-md rounded border border-border bg-surface p-4 shadow-lg"
          >
            <div className="flex items-center justify-between">
              <h2 id={titleId} className="text-base font-semibold text-text">
                Keyboard shortcuts
              </h2>
              <Button ref={closeRef} size="sm" variant="ghost" onClick={() => setOpen(false)}>
                Close <KeyHint keys="Escape" />
              </Button>
            </div>
            <p className="mt-1 text-xs text-muted">Keys work anywhere except while typing in a field. For two-key shortcuts, press the keys one after the other.</p>
            {groupByName(hotkeys).map(([group, list]) => (
              <section key={group} className="mt-3">
                <h3 className="text-xs font-semibold tracking-wide text-muted uppercase">{group}</h3>
                <dl className="mt-1 divide-y divide-border">
                  {list.map((hotkey) => (
                    <div key={hotkey.keys} className="flex items-center justify-between py-1 text-sm">
                      <dt className="text-text">{hotkey.description}</dt>
                      <dd>
                        <KeyHint keys={hotkey.keys} />
                        <span className="sr-only">{describeKeys(hotkey.keys)}</span>
                      </dd>
                    </div>
                  ))}
                </dl>
              </section>
            ))}
          </div>
        </div>
      )}
    </>
  );
}
