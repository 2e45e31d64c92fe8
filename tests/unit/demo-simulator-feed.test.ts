import { createServer, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import RedisMock from 'ioredis-mock';
import { afterEach, describe, expect, it } from 'vitest';
import { startDemoFeed, type DemoFeed, type DemoFeedOptions } from '../../scripts/demo-feed';
import { createDemoWorld } from '../../server/src/demo/simulator/index';

// A loopback HTTP server stands in for the ingest API here: what is under
// test is the feed's client side (pacing, control, retries), not the API.

interface Received {
  at: number;
  authorization: string | undefined;
  ids: string[];
  occurredAt: number[];
  numbers: string[];
}

type Answer = { status: number; body?: unknown; headers?: Record<string, string> };

async function fakeIngest(answer: (index: number, ids: string[]) => Answer = () => ({ status: 202 })) {
  const received: Received[] = [];
  const server: Server = createServer((req, res) => {
    let raw = '';
    req.on('data', (c: Buffer) => (raw += c.toString('utf8')));
    req.on('end', () => {
      const body = JSON.parse(raw) as { transactions: { id: string; occurredAt: string; card: { number: string } }[] };
      const ids = body.transactions.map((t) => t.id);
      received.push({
        at: Date.now(),
        authorization: req.headers.authorization,
        ids,
        occurredAt: body.transactions.map((t) => Date.parse(t.occurredAt)),
        numbers: body.transactions.map((t) => t.card.number),
      });
      const a = answer(received.length - 1, ids);
      res.writeHead(a.status, { 'content-type': 'application/json', ...a.headers });
      res.end(JSON.stringify(a.body ?? { results: ids.map((id) => ({ id, status: 'accepted' })) }));
    });
  });
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  const { port } = server.address() as AddressInfo;
  return {
    url: `http://127.0.0.1:${port}/api/v1/transactions`,
    received,
    sentIds: () => received.flatMap((r) => r.ids),
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}

const wait = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));
const world = createDemoWorld({ seed: 3, cardholders: 300 });
const running: { feed: DemoFeed; close: () => Promise<void> }[] = [];

function start(url: string, redis: InstanceType<typeof RedisMock>, extra: Partial<DemoFeedOptions> = {}) {
  const logs: string[] = [];
  const feed = startDemoFeed({
    url,
    apiKey: 'unit-test-key',
    redis: redis as unknown as DemoFeedOptions['redis'],
    prefix: 'unit',
    world,
    rate: 10,
    controlIntervalMs: 200,
    tickMs: 100,
    retryBaseMs: 50,
    retryMaxMs: 200,
    log: (m, f) => logs.push(`${m} ${JSON.stringify(f ?? {})}`),
    ...extra,
  });
  return { feed, logs };
}

afterEach(async () => {
  for (const r of running.splice(0)) {
    await r.feed.stop();
    await r.close();
  }
});

describe('demo feed runner', () => {
  it('posts batches at the configured rate, with the bearer key, stamped with the time of sending', async () => {
    const api = await fakeIngest();
    const redis = new RedisMock();
    const { feed } = start(api.url, redis);
    running.push({ feed, close: api.close });
    const began = Date.now();
    await wait(4000);
    const elapsed = (Date.now() - began) / 1000;
    const ids = api.sentIds();
    // 10 per second, a Poisson stream with fraud bursts on top: well inside half to twice the rate.
    expect(ids.length).toBeGreaterThan(10 * elapsed * 0.5);
    expect(ids.length).toBeLessThan(10 * elapsed * 2);
    expect(new Set(ids).size).toBe(ids.length);
    // Times are whole seconds, so what falls due goes out about once a second.
    expect(api.received.length).toBeGreaterThanOrEqual(3);
    for (const r of api.received) {
      expect(r.authorization).toBe('Bearer unit-test-key');
      expect(r.ids.length).toBeLessThanOrEqual(500);
      for (const at of r.occurredAt) {
        expect(at).toBeLessThanOrEqual(r.at);
        expect(r.at - at).toBeLessThan(2000);
      }
      for (const id of r.ids) expect(id).toMatch(/^fl-/);
    }
    await feed.stop();
    const stats = await redis.hgetall('unit:demo-feed:stats');
    expect(Number(stats.sent)).toBe(ids.length);
    expect(Number(stats.accepted)).toBe(ids.length);
    expect(Number(stats.rejected)).toBe(0);
    expect(Number.isNaN(Date.parse(stats.updatedAt))).toBe(false);
  }, 15_000);

  it('stops sending while the control hash says paused, and follows a new rate', async () => {
    const api = await fakeIngest();
    const redis = new RedisMock();
    // No fraud: its incidents come in bursts (card testing), which would blur the count of a rate.
    const { feed } = start(api.url, redis, { rate: 5, fraudRate: 0 });
    running.push({ feed, close: api.close });
    await wait(1500);
    expect(api.sentIds().length).toBeGreaterThan(0);
    await redis.hset('unit:demo-feed:control', { paused: '1' });
    // The feed reads the control hash every 200 ms; on a loaded machine that can take longer, so wait
    // until it reports itself paused (and a request already on its way has landed), then watch.
    const pausedBy = Date.now() + 5000;
    while (feed.stats().paused !== true && Date.now() < pausedBy) await wait(50);
    expect(feed.stats().paused).toBe(true);
    await wait(300);
    const atPause = api.sentIds().length;
    await wait(1500);
    expect(api.sentIds().length).toBe(atPause);
    expect((await redis.hgetall('unit:demo-feed:stats')).paused).toBe('1');
    await redis.hset('unit:demo-feed:control', { paused: '0', rate: '40' });
    const resumedBy = Date.now() + 5000;
    while ((feed.stats().paused || feed.stats().rate !== 40) && Date.now() < resumedBy) await wait(50);
    const resumed = api.sentIds().length;
    const from = performance.now();
    await wait(2000);
    // Per second of the time that really passed: a loaded machine can stretch the wait.
    const perSecond = (api.sentIds().length - resumed) / ((performance.now() - from) / 1000);
    // Poisson arrivals at 40 per second: about 80 ± 9 in two seconds; 5 per second would give about 10.
    expect(perSecond).toBeGreaterThan(20);
    expect(perSecond).toBeLessThan(80);
    expect(feed.stats().rate).toBe(40);
  }, 15_000);

  it('retries the same batch after 503s, then carries on', async () => {
    const api = await fakeIngest((i) => (i < 2 ? { status: 503, body: { error: { code: 'UNAVAILABLE', message: 'queue down' } }, headers: { 'retry-after': '0' } } : { status: 202 }));
    const redis = new RedisMock();
    const { feed } = start(api.url, redis);
    running.push({ feed, close: api.close });
    await wait(5000);
    expect(api.received.length).toBeGreaterThan(3);
    const [first, second, third] = api.received;
    expect(second.ids).toEqual(first.ids);
    expect(third.ids).toEqual(first.ids);
    expect(api.received[3].ids.some((id) => first.ids.includes(id))).toBe(false);
    const s = feed.stats();
    expect(s.retries).toBe(2);
    expect(s.lastError).toContain('503');
    expect(s.accepted).toBe(new Set(api.sentIds()).size);
  }, 15_000);

  it('keeps trying while the server is unreachable and stops at once when asked', async () => {
    const api = await fakeIngest();
    const deadUrl = api.url;
    await api.close();
    const redis = new RedisMock();
    const { feed } = start(deadUrl, redis, { retryBaseMs: 5000, retryMaxMs: 5000 });
    await wait(1500);
    const s = feed.stats();
    expect(s.retries).toBeGreaterThan(0);
    expect(s.lastError).toBe('ECONNREFUSED');
    expect(s.sent).toBe(0);
    const before = Date.now();
    await feed.stop();
    expect(Date.now() - before).toBeLessThan(1000);
    expect(Number((await redis.hgetall('unit:demo-feed:stats')).retries)).toBe(s.retries);
  }, 15_000);

  it('counts a refused batch as rejected, moves on, and never logs a card number', async () => {
    const api = await fakeIngest((i, ids) =>
      i === 0
        ? { status: 400, body: { error: { code: 'BAD_REQUEST', message: 'no' } } }
        : i === 1
          ? { status: 202, body: { results: ids.map((id, k) => (k === 0 ? { id, status: 'rejected', errors: [{ path: 'card.number', message: 'bad' }] } : { id, status: 'duplicate' })) } }
          : { status: 202 },
    );
    const redis = new RedisMock();
    const { feed, logs } = start(api.url, redis);
    running.push({ feed, close: api.close });
    await wait(4000);
    expect(api.received.length).toBeGreaterThan(2);
    const [first, second] = api.received;
    expect(second.ids.some((id) => first.ids.includes(id))).toBe(false);
    const s = feed.stats();
    expect(s.rejected).toBe(first.ids.length + 1);
    expect(s.duplicates).toBe(second.ids.length - 1);
    expect(s.sent).toBe(api.sentIds().length);
    const logText = logs.join('\n') + JSON.stringify(await redis.hgetall('unit:demo-feed:stats'));
    expect(logText).toContain('rejected');
    const numbers = new Set(api.received.flatMap((r) => r.numbers));
    expect(numbers.size).toBeGreaterThan(0);
    for (const n of numbers) expect(logText.includes(n)).toBe(false);
  }, 15_000);
});
