import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { installChampion } from '../integration/helpers/champion';
import { listenForAlerts, runFaultScenario, runTag, startStack, type AlertListener, type Stack } from './harness';

/**
 * Redis and MariaDB each restarted in the middle of a load, each on a stack of
 * its own. Neither the web server nor the worker is restarted: they reconnect.
 */
const faults: { fault: string; name: string; restart: (s: Stack) => Promise<void>; maxDrainSeconds: number }[] = [
  // A batch stored just as Redis went away is queued from the web process once Redis is back, not a sweep later.
  { fault: 'Redis restart', name: 'reliability-redis-restart', restart: (s) => s.redis.restart(), maxDrainSeconds: 45 },
  // A commit whose answer was lost with the connection may leave rows the requeue sweeper has to find (60-90 s).
  { fault: 'MariaDB restart', name: 'reliability-mariadb-restart', restart: (s) => s.mariadb.restart(), maxDrainSeconds: 140 },
];

describe.each(faults)('$fault under load', ({ fault, name, restart, maxDrainSeconds }) => {
  let stack: Stack;
  let alerts: AlertListener;

  beforeAll(async () => {
    stack = await startStack({ name, workers: 1, redisAppendOnly: true, seed: async (db) => void (await installChampion(db)) });
    alerts = await listenForAlerts(stack.baseUrl);
  });

  afterAll(async () => {
    alerts?.close();
    await stack?.stop();
  });

  it('loses nothing it accepted, refuses with 503 what it could not keep, and recovers without restarting web or worker', async () => {
    const { row, load, log } = await runFaultScenario(stack, { fault, tag: runTag(name.slice(-13)), atSecond: 5, alerts, inject: () => restart(stack) });
    const a = row.accounting;

    expect(load.sent).toBeGreaterThan(4_000);
    expect(stack.unexpectedExits()).toEqual([]);
    // The restart happened while the load ran: some requests were refused, and only with a 503.
    expect(a.refused503).toBeGreaterThan(0);
    expect(a.otherFailures).toBe(0);
    expect(a.lostIds).toEqual([]);
    expect(a.lost).toBe(0);
    expect(a.unscoredInDb).toBe(0);
    expect(a.duplicateDetail).toEqual({ rows: 0, scores: 0, alerts: 0, pushes: 0, caseCounts: 0 });
    // Every refused batch was resent and in the end kept: the caller can always get its transactions in.
    expect(a.neverKept).toBe(0);
    expect(log.kept().length).toBe(load.sent);
    expect(a.scored).toBe(load.sent);
    expect(row.recoverySeconds).not.toBeNull();
    expect(row.recoverySeconds!).toBeLessThan(15);
    expect(row.drainSeconds).not.toBeNull();
    expect(row.drainSeconds!).toBeLessThan(maxDrainSeconds);
  });
});
