import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { installChampion } from '../integration/helpers/champion';
import { listenForAlerts, runFaultScenario, runTag, sleep, startStack, watchScoringQueue, type AlertListener, type Stack } from './harness';

let stack: Stack;
let alerts: AlertListener;

beforeAll(async () => {
  stack = await startStack({ name: 'reliability-worker-kill', workers: 1, seed: async (db) => void (await installChampion(db)) });
  alerts = await listenForAlerts(stack.baseUrl);
});

afterAll(async () => {
  alerts?.close();
  await stack?.stop();
});

describe('scoring worker killed with SIGKILL under load', () => {
  it('scores every accepted transaction exactly once after the worker comes back, and pushes no alert twice', async () => {
    const queue = watchScoringQueue(stack);
    let activeAtKill = 0;
    const { row, load } = await runFaultScenario(stack, {
      fault: 'worker SIGKILL',
      tag: runTag('wk'),
      atSecond: 5,
      ratePerSecond: 500,
      // Large batches: a job takes long enough that the kill lands in the middle of one.
      batchSize: 100,
      alerts,
      inject: async () => {
        // Kill it while it holds a job, so a half-done job has to be taken over.
        activeAtKill = await queue.untilActive(3_000);
        await stack.killWorker(0);
        await sleep(3_000);
        await stack.startWorker(0);
      },
    });
    const stalled = queue.stalled();
    await queue.close();
    const a = row.accounting;
    console.log(`jobs active when the worker was killed: ${activeAtKill}; stalled jobs taken over after the restart: ${stalled}`);

    expect(load.sent).toBeGreaterThan(4_000);
    expect(activeAtKill).toBeGreaterThan(0);
    expect(stack.unexpectedExits()).toEqual([]);
    // The killed worker's job is taken over within seconds (short scoring locks), not after a minute.
    expect(stalled).toBeGreaterThan(0);
    expect(row.drainSeconds).not.toBeNull();
    expect(row.drainSeconds!).toBeLessThan(45);
    // Ingest does not depend on the worker: everything is accepted at once.
    expect(a.neverKept).toBe(0);
    expect(a.refused503).toBe(0);
    expect(a.otherFailures).toBe(0);
    expect(a.lostIds).toEqual([]);
    expect(a.unscoredInDb).toBe(0);
    expect(a.duplicateDetail).toEqual({ rows: 0, scores: 0, alerts: 0, pushes: 0, caseCounts: 0 });
    expect(a.scored).toBe(a.accepted);
    expect(a.accepted).toBe(load.sent);
    // Some of the load alerted (every 20th is a large amount), so the push check checked something.
    expect(alerts.received.size).toBeGreaterThan(10);
  });
});
