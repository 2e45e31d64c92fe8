import {
  createContext,
  useCallback,
  useContext,
  useEffect,
  useLayoutEffect,
  useMemo,
  useRef,
  useState,
  type ReactNode,
} from 'react';

/**
 * A small keyboard-shortcut registry. Keys are written as space-separated
 * sequences of `KeyboardEvent.key` values: "?", "Escape", "g q" (press g,
 * then q), or one chord with Ctrl (Cmd on a Mac): "Ctrl+Enter". Whatever is
 * registered is what the help overlay lists, so the list cannot drift from the
 * keys that actually work.
 */
export type Hotkey = { keys: string; description: string; group: string };

type Entry = Hotkey & { id: number; handler: (event: KeyboardEvent) => void };

type Registry = {
  register: (entry: Omit<Entry, 'id'>) => () => void;
  hotkeys: Hotkey[];
};

const HotkeysContext = createContext<Registry | null>(null);

/** How long the second key of a sequence may wait for the first. */
export const SEQUENCE_TIMEOUT_MS = 1500;

function isTyping(target: EventTarget | null): boolean {
  if (!(target instanceof HTMLElement)) return false;
  if (target.isContentEditable) return true;
  const tag = target.tagName;
  if (tag === 'TEXTAREA' || tag === 'SELECT') return true;
  if (tag !== 'INPUT') return false;
  const type = (target as HTMLInputElement).type;
  return !['checkbox', 'radio', 'button', 'submit', 'reset', 'range', 'color'].includes(type);
}

export function HotkeysProvider({ children }: { children: ReactNode }) {
  const entries = useRef(new Map<number, Entry>());
  const nextId = useRef(1);
  const [hotkeys, setHotkeys] = useState<Hotkey[]>([]);

  const publish = useCallback(() => {
    const seen = new Set<string>();
    const list: Hotkey[] = [];
    // The latest registration of a key wins, so list only that one.
    for (const entry of [...entries.current.values()].reverse()) {
      if (seen.has(entry.keys)) continue;
      seen.add(entry.keys);
      list.unshift({ keys: entry.keys, description: entry.description, group: entry.group });
    }
    setHotkeys(list);
  }, []);

  const register = useCallback<Registry['register']>(
    (entry) => {
      const id = nextId.current++;
      entries.current.set(id, { ...entry, id });
      publish();
      return () => {
        entries.current.delete(id);
        publish();
      };
    },
    [publish],
  );

  useEffect(() => {
    let pending = '';
    let timer: ReturnType<typeof setTimeout> | undefined;
    const clearPending = () => {
      pending = '';
      if (timer) clearTimeout(timer);
      timer = undefined;
    };
    const find = (keys: string) => {
      const all = [...entries.current.values()];
      for (let i = all.length - 1; i >= 0; i--) if (all[i].keys === keys) return all[i];
      return undefined;
    };
    const isPrefix = (keys: string) => [...entries.current.values()].some((e) => e.keys.startsWith(`${keys} `));

    const onKeyDown = (event: KeyboardEvent) => {
      if (event.defaultPrevented || event.altKey) return;
      if (event.ctrlKey || event.metaKey) {
        // A modifier chord is never text, so it works inside fields too (Ctrl+Enter saves a form while typing).
        const chord = find(`Ctrl+${event.key}`);
        if (chord) {
          clearPending();
          event.preventDefault();
          chord.handler(event);
        }
        return;
      }
      if (event.key !== 'Escape' && isTyping(event.target)) {
        clearPending();
        return;
      }
      const key = event.key;
      const candidate = pending ? `${pending} ${key}` : key;
      const match = find(candidate) ?? (pending ? find(key) : undefined);
      if (match) {
        clearPending();
        event.preventDefault();
        match.handler(event);
        return;
      }
      if (isPrefix(candidate)) {
        pending = candidate;
        if (timer) clearTimeout(timer);
        timer = setTimeout(clearPending, SEQUENCE_TIMEOUT_MS);
        return;
      }
      clearPending();
    };
    document.addEventListener('keydown', onKeyDown);
    return () => {
      clearPending();
      document.removeEventListener('keydown', onKeyDown);
    };
  }, []);

  const value = useMemo(() => ({ register, hotkeys }), [register, hotkeys]);
  return <HotkeysContext.Provider value={value}>{children}</HotkeysContext.Provider>;
}

function useRegistry(): Registry {
  const registry = useContext(HotkeysContext);
  if (!registry) throw new Error('Hotkeys need a <HotkeysProvider> above them.');
  return registry;
}

/** Binds `keys` while the component is mounted (and `enabled`). */
export function useHotkey(
  keys: string,
  handler: (event: KeyboardEvent) => void,
  options: { description: string; group?: string; enabled?: boolean },
): void {
  const { register } = useRegistry();
  const handlerRef = useRef(handler);
  useLayoutEffect(() => {
    handlerRef.current = handler;
  });
  const { description, group = 'General', enabled = true } = options;
  useEffect(() => {
    if (!enabled) return;
    return register({ keys, description, group, handler: (event) => handlerRef.current(event) });
  }, [register, keys, description, group, enabled]);
}

/** Every shortcut that works right now, for the help overlay. */
export function useRegisteredHotkeys(): Hotkey[] {
  return useRegistry().hotkeys;
}
