import { mkdtemp, readdir, readFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { QueryTypes } from 'sequelize';
import { createApiKey } from '../../server/src/api-keys/api-key-repository';
import { signWebhook } from '../../server/src/outgoing/outgoing-events';
import { createScoringWorker } from '../../workers/src/scoring.worker';
import { createOutgoingWorker } from '../../workers/src/outgoing.worker';
import { startWebhookCatcher, type WebhookCatcherHandle } from '../../scripts/services/webhook-catcher';
import { signedInAgent, startTestServer, type TestServer } from './helpers/test-server';
import { installChampion } from './helpers/champion';
import { txn } from './helpers/transactions';
import { freePort, waitFor } from './helpers/net';

const SECRET = 'integration-webhook-secret-0123';
let ts: TestServer;
let catcher: WebhookCatcherHandle;
let dir: string;
const closers: (() => Promise<unknown>)[] = [];

beforeAll(async () => {
  dir = await mkdtemp(path.join(tmpdir(), 'edgecase-webhooks-'));
  catcher = await startWebhookCatcher({ dir, port: await freePort(), secret: SECRET });
  ts = await startTestServer({ UPSTREAM_WEBHOOK_URL: catcher.url, UPSTREAM_WEBHOOK_SECRET: SECRET });
  await installChampion(ts.server.db);
  const scoring = await createScoringWorker(ts.server.config, ts.server.db, 2);
  const outgoing = createOutgoingWorker(ts.server.config, ts.server.db);
  closers.push(() => scoring.close(), () => outgoing.close(), () => catcher.stop());
});

afterAll(async () => {
  for (const c of closers) await c().catch(() => undefined);
  await ts?.close();
});

describe('outgoing events to the upstream system', () => {
  it('the upstream stand-in refuses an event whose signature does not match', async () => {
    const body = JSON.stringify({ id: 1, type: 'card.blocked', data: {} });
    const ts0 = String(Math.floor(Date.now() / 1000));
    const wrong = await fetch(catcher.url, {
      method: 'POST',
      headers: { 'content-type': 'application/json', 'x-edgecase-timestamp': ts0, 'x-edgecase-signature': signWebhook('another-secret-of-16+', ts0, body) },
      body,
    });
    expect(wrong.status).toBe(401);
    const right = await fetch(catcher.url, {
      method: 'POST',
      headers: { 'content-type': 'application/json', 'x-edgecase-timestamp': ts0, 'x-edgecase-signature': signWebhook(SECRET, ts0, body), 'x-edgecase-event': 'probe' },
      body,
    });
    expect(right.status).toBe(204);
  });

  it('delivers a card block to the upstream endpoint, signed, and marks it delivered', async () => {
    const key = (await createApiKey(ts.server.db, { name: 'outgoing it', scopes: ['transactions:write', 'transactions:read'] })).key;
    const t = txn({ amount: '2950.00' }, 88_001);
    await request(ts.server.http).post('/api/v1/transactions').set('Authorization', `Bearer ${key}`).send(t).expect(202);
    const caseId = await waitFor(async () => {
      const r = await request(ts.server.http).get(`/api/v1/transactions/${t.id}`).set('Authorization', `Bearer ${key}`);
      return r.body.transaction?.caseId ?? null;
    });
    const inv = await signedInAgent(ts, 'investigator');
    await inv.agent.post(`/api/cases/${caseId}/claim`).set('X-CSRF-Token', inv.csrf).expect(200);
    await inv.agent.post(`/api/cases/${caseId}/card`).set('X-CSRF-Token', inv.csrf).send({ action: 'block', reason: 'Cardholder denies the payment' }).expect(200);
    const file = await waitFor(async () => {
      for (const f of (await readdir(dir)).filter((n) => n.endsWith('.json'))) {
        const e = JSON.parse(await readFile(path.join(dir, f), 'utf8'));
        if (e.event === 'card.blocked') return f;
      }
      return null;
    });
    const got = JSON.parse(await readFile(path.join(dir, file), 'utf8'));
    expect(got.event).toBe('card.blocked');
    expect(got.body.data.caseId).toBe(caseId);
    expect(got.body.data.card.last4).toBe(t.card.number.slice(-4));
    expect(JSON.stringify(got)).not.toContain(t.card.number);
    await waitFor(async () => {
      const [row] = await ts.server.db.sequelize.query<{ status: string }>('SELECT status FROM outgoing_events WHERE id = ?', {
        replacements: [got.body.id],
        type: QueryTypes.SELECT,
      });
      return row?.status === 'delivered';
    });
  });
});
