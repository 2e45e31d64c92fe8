import { killAllChildrenNow } from './child';

/**
 * First SIGINT/SIGTERM/SIGHUP: `onStop` (orderly shutdown). Another one later:
 * everything we started is killed at once and the process exits.
 *
 * The same Ctrl-C can arrive two or three times within a few milliseconds
 * (from the terminal, and relayed by npm), so repeats inside a short window
 * count as one.
 */
export function onStopSignals(onStop: (signal: NodeJS.Signals) => void, log: (m: string) => void): AbortSignal {
  const controller = new AbortController();
  let firstAt = 0;
  const handler = (signal: NodeJS.Signals) => {
    const now = Date.now();
    if (firstAt === 0) {
      firstAt = now;
      controller.abort();
      log(`${signal}: stopping everything (press Ctrl-C again to force)`);
      onStop(signal);
      return;
    }
    if (now - firstAt < 1_000) return;
    log(`${signal} again: killing everything now`);
    killAllChildrenNow();
    process.exit(130);
  };
  for (const s of ['SIGINT', 'SIGTERM', 'SIGHUP'] as const) process.on(s, handler);
  return controller.signal;
}
