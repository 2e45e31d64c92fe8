/**
 * The ingest batcher's grouping rules (server/src/ingest/ingest-batcher.ts), watched through an
 * injected store that records each call and finishes only when the test says so:
 *   - under light load a request is stored at once (no timer);
 *   - requests that arrive while the flush slots are busy wait and are stored together, each
 *     answered with its own items only;
 *   - a group holds at most `maxItems` transactions, and no more than `concurrentFlushes` groups
 *     are stored at once, a full group included;
 *   - groups carrying prescored rows (decisions) are stored one at a time, in a slot of their own
 *     (an ordinary flush in progress does not hold a decision back);
 *   - an upstream id repeated by two requests of one group is stored once: the first request gets it
 *     as inserted, the second as existing (its duplicate);
 *   - a failed store rejects every request of its group and the next group still runs.
 * These are the product's own rules (no outside reference applies); the integration and benchmark
 * runs exercise them end to end.
 */
import { describe, expect, it } from 'vitest';
import type { NormalisedTransaction } from '@shared/api/transactions';
import type { Database } from '../../../server/src/db/database';
import type { ScoringQueue } from '../../../server/src/ingest/ingest-queue';
import { IngestBatcher, type Prescored, type StoredAndQueued, type storeAndQueue } from '../../../server/src/ingest/ingest-batcher';

interface Call {
  ids: string[];
  prescored: number;
  finish: () => void;
  fail: (e: Error) => void;
}

function harness(limits = { maxItems: 1000, concurrentFlushes: 2 }) {
  const calls: Call[] = [];
  let inFlight = 0;
  let maxInFlight = 0;
  let nextId = 1;
  const store: typeof storeAndQueue = (_db, _q, items, _meta, opts) =>
    new Promise<StoredAndQueued>((resolve, reject) => {
      inFlight += 1;
      maxInFlight = Math.max(maxInFlight, inFlight);
      const done = () => (inFlight -= 1);
      // Named when the store is called, so two stores never share a name.
      const batch = `b${calls.length + 1}`;
      calls.push({
        ids: items.map((t) => t.externalId),
        prescored: opts?.prescored?.size ?? 0,
        finish: () => {
          done();
          resolve({ batch, inserted: new Map(items.map((t) => [t.externalId, nextId++])), existing: new Map(), queued: true });
        },
        fail: (e) => {
          done();
          reject(e);
        },
      });
    });
  const batcher = new IngestBatcher({} as Database, {} as ScoringQueue, undefined, limits, store);
  return { batcher, calls, maxInFlight: () => maxInFlight };
}

const tx = (id: string): NormalisedTransaction => ({ externalId: id }) as NormalisedTransaction;
const meta = (source: 'api' | 'decision' = 'api') => ({ source, apiKeyId: 1, receivedAt: new Date() });
const prescored = (id: string): Prescored => new Map([[id, {} as never]]);
const tick = () => new Promise((r) => setImmediate(r));

describe('IngestBatcher grouping', () => {
  it('stores a request at once when nothing else is in flight', async () => {
    const h = harness();
    const p = h.batcher.submit([tx('a')], meta());
    expect(h.calls.map((c) => c.ids)).toEqual([['a']]);
    h.calls[0].finish();
    const r = await p;
    expect([...r.inserted.keys()]).toEqual(['a']);
  });

  it('groups requests that arrive while both flush slots are busy, and answers each with its own items', async () => {
    const h = harness();
    const first = [h.batcher.submit([tx('a')], meta()), h.batcher.submit([tx('b')], meta())];
    const waiting = [h.batcher.submit([tx('c')], meta()), h.batcher.submit([tx('d'), tx('e')], meta()), h.batcher.submit([tx('f')], meta())];
    expect(h.calls.map((c) => c.ids)).toEqual([['a'], ['b']]);
    h.calls[0].finish();
    await tick();
    expect(h.calls[2].ids).toEqual(['c', 'd', 'e', 'f']);
    h.calls[1].finish();
    h.calls[2].finish();
    const answers = await Promise.all([...first, ...waiting]);
    expect(answers.map((a) => [...a.inserted.keys()])).toEqual([['a'], ['b'], ['c'], ['d', 'e'], ['f']]);
    // The grouped requests share one store (one batch name).
    expect(new Set(answers.slice(2).map((a) => a.batch)).size).toBe(1);
  });

  it('caps a group at maxItems and never runs more flushes than allowed, a full group included', async () => {
    const h = harness({ maxItems: 3, concurrentFlushes: 1 });
    const all = [h.batcher.submit([tx('a')], meta())];
    for (const id of ['b', 'c', 'd', 'e', 'f', 'g', 'h']) all.push(h.batcher.submit([tx(id)], meta()));
    expect(h.calls).toHaveLength(1);
    for (let i = 0; i < 4 && i < h.calls.length; i += 1) {
      h.calls[i].finish();
      await tick();
    }
    // The groups first: if grouping breaks, some requests are never stored and this says how.
    expect(h.calls.map((c) => c.ids)).toEqual([['a'], ['b', 'c', 'd'], ['e', 'f', 'g'], ['h']]);
    await Promise.all(all);
    expect(h.maxInFlight()).toBe(1);
  });

  it('stores groups of decisions one at a time, in a slot of their own beside the ordinary groups', async () => {
    const h = harness({ maxItems: 1000, concurrentFlushes: 1 });
    const a = h.batcher.submit([tx('a')], meta());
    const d1 = h.batcher.submit([tx('d1')], meta('decision'), prescored('d1'));
    const d2 = h.batcher.submit([tx('d2')], meta('decision'), prescored('d2'));
    const b = h.batcher.submit([tx('b')], meta());
    // The ordinary slot is taken by a; d1 does not wait behind it; d2 waits for d1, b for a.
    expect(h.calls.map((c) => c.ids)).toEqual([['a'], ['d1']]);
    h.calls[0].finish();
    await tick();
    expect(h.calls.map((c) => c.ids)).toEqual([['a'], ['d1'], ['b']]);
    h.calls[2].finish();
    await tick();
    expect(h.calls).toHaveLength(3);
    h.calls[1].finish();
    await tick();
    expect(h.calls.map((c) => c.ids)).toEqual([['a'], ['d1'], ['b'], ['d2']]);
    expect(h.calls[3].prescored).toBe(1);
    h.calls[3].finish();
    await Promise.all([a, d1, d2, b]);
  });

  it('stores an id repeated by two requests of one group once: the second request gets it as its duplicate', async () => {
    const h = harness({ maxItems: 1000, concurrentFlushes: 1 });
    const busy = h.batcher.submit([tx('x')], meta());
    const one = h.batcher.submit([tx('r'), tx('s')], meta());
    const two = h.batcher.submit([tx('r')], meta());
    h.calls[0].finish();
    await tick();
    expect(h.calls[1].ids).toEqual(['r', 's']);
    h.calls[1].finish();
    const [, a, b] = await Promise.all([busy, one, two]);
    expect([...a.inserted.keys()]).toEqual(['r', 's']);
    expect([...b.inserted.keys()]).toEqual([]);
    expect(b.existing.get('r')).toBe(a.inserted.get('r'));
  });

  it('rejects every request of a group whose store failed and goes on with the next group', async () => {
    const h = harness({ maxItems: 1000, concurrentFlushes: 1 });
    const busy = h.batcher.submit([tx('a')], meta());
    const grouped = [h.batcher.submit([tx('b')], meta()), h.batcher.submit([tx('c')], meta())];
    h.calls[0].fail(new Error('deadlock'));
    await expect(busy).rejects.toThrow('deadlock');
    await tick();
    h.calls[1].fail(new Error('gone'));
    for (const g of grouped) await expect(g).rejects.toThrow('gone');
    const later = h.batcher.submit([tx('d')], meta());
    expect(h.calls[2].ids).toEqual(['d']);
    h.calls[2].finish();
    await expect(later).resolves.toMatchObject({ queued: true });
  });
});
