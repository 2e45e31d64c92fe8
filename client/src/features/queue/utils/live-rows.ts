import type { CaseSummary, QueueResponse } from '@shared/api/cases';

/**
 * What the queue shows while cases arrive live. The server's page is the
 * truth; this only decides when a newly arrived case appears, so that the row
 * the person is working on never moves under them.
 *
 * - known: every case id this view has seen, so "new" means new to this person.
 * - held: new cases that sort above the anchor (the row under the cursor);
 *   they wait behind a counter until the person asks to see them.
 * - fresh: new cases already shown, marked as such.
 */
export type LiveRows = {
  key: string;
  source: QueueResponse | undefined;
  known: ReadonlySet<number>;
  held: ReadonlySet<number>;
  fresh: ReadonlySet<number>;
};

const EMPTY: ReadonlySet<number> = new Set();

export function startLiveRows(key: string, source: QueueResponse | undefined): LiveRows {
  return { key, source, known: new Set(source?.items.map((c) => c.id) ?? []), held: EMPTY, fresh: EMPTY };
}

/**
 * Folds a newer server page into the state. A different key (another view,
 * filter, sort or page) starts over: nothing there is "new", the person asked
 * for a different list.
 */
export function reconcileLiveRows(previous: LiveRows, key: string, source: QueueResponse, anchorId: number | null): LiveRows {
  if (previous.key !== key || !previous.source) return startLiveRows(key, source);
  const ids = source.items.map((c) => c.id);
  const present = new Set(ids);
  const anchorIndex = anchorId === null ? -1 : ids.indexOf(anchorId);
  const known = new Set(previous.known);
  const held = new Set([...previous.held].filter((id) => present.has(id)));
  const fresh = new Set([...previous.fresh].filter((id) => present.has(id)));
  ids.forEach((id, index) => {
    if (known.has(id)) return;
    known.add(id);
    if (anchorIndex >= 0 && index < anchorIndex) held.add(id);
    else fresh.add(id);
  });
  return { key, source, known, held, fresh };
}

/** "Show new arrivals": the held cases join the list, marked as new. */
export function revealHeld(state: LiveRows): LiveRows {
  if (state.held.size === 0) return state;
  return { ...state, held: EMPTY, fresh: new Set([...state.fresh, ...state.held]) };
}

/** The person has looked at a new row: it stops being marked. */
export function settleFresh(state: LiveRows, id: number): LiveRows {
  if (!state.fresh.has(id)) return state;
  const fresh = new Set(state.fresh);
  fresh.delete(id);
  return { ...state, fresh };
}

export function visibleCases(state: LiveRows): CaseSummary[] {
  const items = state.source?.items ?? [];
  return state.held.size === 0 ? items : items.filter((c) => !state.held.has(c.id));
}
