/** MariaDB's ER_LOCK_DEADLOCK: InnoDB rolled the transaction back, so running it again from the start is safe. */
const DEADLOCK = 1213;

export function isDeadlock(err: unknown): boolean {
  const e = err as { parent?: { errno?: number }; original?: { errno?: number } };
  return e?.parent?.errno === DEADLOCK || e?.original?.errno === DEADLOCK;
}

/**
 * Runs a whole database transaction, and again after a random pause that grows
 * with each try when InnoDB picked it as a deadlock victim; nothing of a
 * rolled-back try is kept, so when the tries run out `refuse()` gives the error
 * to throw (an honest "nothing was kept, retry").
 */
export async function retryOnDeadlock<T>(
  work: () => Promise<T>,
  opts: { retries: number; pauseMs: (attempt: number) => number; refuse: () => Error },
): Promise<T> {
  for (let attempt = 0; ; attempt += 1) {
    try {
      return await work();
    } catch (err) {
      if (!isDeadlock(err)) throw err;
      if (attempt >= opts.retries) throw opts.refuse();
      await new Promise((r) => setTimeout(r, opts.pauseMs(attempt)));
    }
  }
}
