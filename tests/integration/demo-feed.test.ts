import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { QueryTypes } from 'sequelize';
import { startDemoFeed, type DemoFeed } from '../../scripts/demo-feed';
import { createDemoWorld, DEMO_SEED } from '../../server/src/demo/simulator/index';
import { DEMO_API_KEY } from '../../server/src/demo/demo-accounts';
import { createRedis } from '../../server/src/lib/redis';
import type { DemoFeedState } from '../../shared/src/api/admin';
import { installChampion } from './helpers/champion';
import { signedInAgent, startTestServer, type Agent, type TestServer } from './helpers/test-server';
import { waitFor } from './helpers/supervision-kit';

let ts: TestServer;
let admin: { agent: Agent; csrf: string };
let feed: DemoFeed | undefined;
const feedRedis = () => createRedis(ts.server.config, { name: 'feed-it' });
let redis: ReturnType<typeof feedRedis>;

const state = async () => (await admin.agent.get('/api/demo/feed').expect(200)).body.feed as DemoFeedState;
const put = (body: object) => admin.agent.put('/api/demo/feed').set('X-CSRF-Token', admin.csrf).send(body);

beforeAll(async () => {
  ts = await startTestServer();
  await installChampion(ts.server.db);
  admin = await signedInAgent(ts, 'admin');
  redis = feedRedis();
});

afterAll(async () => {
  await feed?.stop();
  redis?.disconnect();
  await ts?.close();
});

describe('demo feed controls', () => {
  it('reports nothing before the feed runs, and refuses a pace the feed cannot take', async () => {
    expect(await state()).toEqual({
      requested: { paused: null, rate: null },
      reported: null,
      totals: { sent: 0, accepted: 0, duplicates: 0, rejected: 0, retries: 0 },
      lastError: null,
    });
    const tooFast = await put({ rate: 1500 });
    expect(tooFast.status).toBe(400);
    expect(JSON.stringify(tooFast.body)).toContain('rate');
    expect((await put({})).status).toBe(400);
    expect((await put({ paused: true, extra: 1 })).status).toBe(400);
    expect((await state()).requested).toEqual({ paused: null, rate: null });
  });

  it('pauses the real feed and changes its pace through the API, and audits each change', async () => {
    const [{ last }] = await ts.server.db.sequelize.query<{ last: number | null }>('SELECT MAX(id) AS last FROM audit_log', { type: QueryTypes.SELECT });
    feed = startDemoFeed({
      url: `${ts.baseUrl}/api/v1/transactions`,
      apiKey: DEMO_API_KEY,
      redis,
      prefix: ts.server.config.REDIS_PREFIX,
      world: createDemoWorld({ seed: DEMO_SEED, cardholders: 200 }),
      rate: 20,
      controlIntervalMs: 200,
      tickMs: 100,
    });
    // The feed reports what it sent and what the real ingest API accepted.
    const running = await waitFor(async () => {
      const s = await state();
      return s.reported && s.totals.accepted >= 5 ? s : null;
    });
    expect(running.reported).toMatchObject({ paused: false, rate: 20 });
    expect(running.totals.accepted + running.totals.duplicates + running.totals.rejected).toBeLessThanOrEqual(running.totals.sent);

    const paused = await put({ paused: true });
    expect(paused.status).toBe(200);
    expect(paused.body.feed.requested).toEqual({ paused: true, rate: null });
    await waitFor(async () => ((await state()).reported?.paused ? true : null));
    // Paused: nothing more is sent.
    const sentAtPause = feed.stats().sent;
    await new Promise((r) => setTimeout(r, 600));
    expect(feed.stats().sent).toBe(sentAtPause);

    expect((await put({ paused: false, rate: 7.5 })).status).toBe(200);
    const resumed = await waitFor(async () => {
      const s = await state();
      return s.reported && !s.reported.paused && s.reported.rate === 7.5 ? s : null;
    });
    expect(resumed.requested).toEqual({ paused: false, rate: 7.5 });

    const audit = await ts.server.db.sequelize.query<{ details: string; actor_id: number | null }>(
      "SELECT details, actor_id FROM audit_log WHERE action = 'demo.feed_control' AND id > ? ORDER BY id",
      { replacements: [last ?? 0], type: QueryTypes.SELECT },
    );
    expect(audit.map((a) => JSON.parse(a.details))).toEqual([{ paused: true }, { paused: false, rate: 7.5 }]);
    expect(audit.every((a) => a.actor_id !== null)).toBe(true);
  });
});
