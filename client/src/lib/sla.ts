/** How close a case is to its SLA deadline: on track, due soon (urgent) or breached. */
export type SlaState = 'on_track' | 'due_soon' | 'breached';

/** Inside this much time left the countdown turns urgent. */
export const SLA_DUE_SOON_MS = 30 * 60_000;

export function slaState(dueAt: string, now: number): { state: SlaState; remainingMs: number } {
  const remainingMs = Date.parse(dueAt) - now;
  if (!Number.isFinite(remainingMs)) return { state: 'on_track', remainingMs: NaN };
  if (remainingMs <= 0) return { state: 'breached', remainingMs };
  if (remainingMs <= SLA_DUE_SOON_MS) return { state: 'due_soon', remainingMs };
  return { state: 'on_track', remainingMs };
}
