import { useRef, useState } from 'react';
import { Button } from '@/components/ui/button';
import { Dialog } from '@/components/ui/dialog';
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
  const closeRef = useRef<HTMLButtonElement>(null);
  const hotkeys = useRegisteredHotkeys();

  useHotkey('?', () => setOpen((wasOpen) => !wasOpen), { description: 'Show or hide this list of shortcuts' });
  // Escape inside the dialog closes it there (Dialog); this entry lists the key and covers focus outside it.
  useHotkey('Escape', () => setOpen(false), { description: 'Close this list', enabled: open });

  return (
    <>
      <Button size="sm" variant="ghost" onClick={() => setOpen(true)} aria-haspopup="dialog">
        Shortcuts <KeyHint keys="?" />
      </Button>
      {open && (
        <Dialog
          title="Keyboard shortcuts"
          onClose={() => setOpen(false)}
          initialFocus={closeRef}
          action={
            <Button ref={closeRef} size="sm" variant="ghost" onClick={() => setOpen(false)}>
              Close <KeyHint keys="Escape" />
            </Button>
          }
        >
          <p className="text-xs text-muted">Keys work anywhere except while typing in a field. For two-key shortcuts, press the keys one after the other.</p>
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
        </Dialog>
      )}
    </>
  );
}
