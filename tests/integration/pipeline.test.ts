import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { QueryTypes } from 'sequelize';
import { Queue } from 'bullmq';
import { QUEUES } from '@shared/jobs/queues';
import { createRedis } from '../../server/src/lib/redis';
import { createApiKey } from '../../server/src/api-keys/api-key-repository';
import { createScoringWorker } from '../../workers/src/scoring.worker';
import { connectSocket, csrfToken, DEMO_PASSWORD, sessionCookieOf, startTestServer, type TestServer } from './helpers/test-server';
import { installChampion } from './helpers/champion';
import { testPan, txn } from './helpers/transactions';
import { waitFor } from './helpers/net';

let ts: TestServer;
let key: string;
let readOnlyKey: string;
let workers: Awaited<ReturnType<typeof createScoringWorker>>[] = [];

const post = (body: unknown, k = key) => request(ts.server.http).post('/api/v1/transactions').set('Authorization', `Bearer ${k}`).send(body as object);
const get = (id: string, k = key) => request(ts.server.http).get(`/api/v1/transactions/${encodeURIComponent(id)}`).set('Authorization', `Bearer ${k}`);

async function scored(id: string) {
  return waitFor(async () => {
    const r = await get(id);
    return r.status === 200 && r.body.transaction.status === 'scored' ? r.body.transaction : null;
  });
}

/** The demo investigator's live socket, signed in through the API, and the queue alerts it has heard. */
async function investigatorAlerts() {
  const agent = request.agent(ts.server.http);
  const token = await csrfToken(agent);
  const login = await agent.post('/api/auth/login').set('X-CSRF-Token', token).send({ email: 'investigator@demo.test', password: DEMO_PASSWORD });
  const socket = connectSocket(ts.baseUrl, sessionCookieOf(login));
  await new Promise((resolve) => socket.on('hello', resolve));
  const pushed: { caseId: number; created: boolean }[] = [];
  socket.on('queue:alert', (e) => pushed.push(e));
  return { socket, pushed };
}

beforeAll(async () => {
  ts = await startTestServer();
  await installChampion(ts.server.db);
  key = (await createApiKey(ts.server.db, { name: 'it upstream', scopes: ['transactions:write', 'transactions:read', 'decisions:write'] })).key;
  readOnlyKey = (await createApiKey(ts.server.db, { name: 'it read only', scopes: ['transactions:read'] })).key;
  workers = [await createScoringWorker(ts.server.config, ts.server.db, 2), await createScoringWorker(ts.server.config, ts.server.db, 2)];
});

afterAll(async () => {
  await Promise.all(workers.map((w) => w.close()));
  await ts?.close();
});

describe('ingest API', () => {
  it('accepts a transaction, scores it once, and answers a repeat as a duplicate with the earlier result', async () => {
    const t = txn();
    const first = await post(t);
    expect(first.status).toBe(202);
    expect(first.body.results).toEqual([expect.objectContaining({ id: t.id, status: 'accepted' })]);
    const view = await scored(t.id);
    expect(view.score.probability).toBeGreaterThanOrEqual(0);
    expect(view.score.probability).toBeLessThanOrEqual(1);
    expect(Math.abs(view.score.normalizedMargin)).toBeLessThanOrEqual(1);
    expect(view.score.reasons.length).toBeGreaterThan(0);
    const again = await post(t);
    expect(again.status).toBe(202);
    expect(again.body.results[0]).toMatchObject({ id: t.id, status: 'duplicate' });
    expect(again.body.results[0].previous.score.probability).toBeCloseTo(view.score.probability, 12);
    const [{ n }] = await ts.server.db.sequelize.query<{ n: number }>(
      'SELECT COUNT(*) AS n FROM transaction_scores s JOIN transactions t ON t.id = s.transaction_id WHERE t.external_id = ?',
      { replacements: [t.id], type: QueryTypes.SELECT },
    );
    expect(Number(n)).toBe(1);
  });

  it('answers each item of a batch in order: accepted, rejected with its fields, duplicate', async () => {
    const good = txn();
    const bad = txn({ amount: '12.345', merchant: { id: 'm', name: 'X', mcc: '54', country: 'ZZ' } });
    const res = await post({ transactions: [good, bad, good] });
    expect(res.status).toBe(202);
    const [a, b, c] = res.body.results;
    expect(a).toMatchObject({ id: good.id, status: 'accepted' });
    expect(b.status).toBe('rejected');
    const paths = b.errors.map((e: { path: string }) => e.path);
    expect(paths).toEqual(expect.arrayContaining(['amount', 'merchant.mcc', 'merchant.country']));
    expect(c).toMatchObject({ id: good.id, status: 'duplicate' });
  });

  it('keeps card numbers out of the database: only BIN, last four and a keyed hash', async () => {
    const t = txn({}, 4242);
    await post(t).expect(202);
    await scored(t.id);
    const pan = testPan(4242);
    const tables = ['cards', 'transactions', 'transaction_features', 'transaction_scores', 'audit_log'];
    for (const table of tables) {
      const rows = await ts.server.db.sequelize.query<Record<string, unknown>>(`SELECT * FROM ${table}`, { type: QueryTypes.SELECT });
      expect(JSON.stringify(rows)).not.toContain(pan);
    }
    const [card] = await ts.server.db.sequelize.query<{ bin: string; last4: string; pan_hash: string }>(
      'SELECT c.bin, c.last4, c.pan_hash FROM cards c JOIN transactions t ON t.card_id = c.id WHERE t.external_id = ?',
      { replacements: [t.id], type: QueryTypes.SELECT },
    );
    expect(card.bin).toBe(pan.slice(0, 6));
    expect(card.last4).toBe(pan.slice(-4));
    expect(card.pan_hash).toMatch(/^[0-9a-f]{64}$/);
  });

  it('queues each transaction of concurrent single-transaction requests in exactly one scoring job', async () => {
    const items = Array.from({ length: 40 }, (_, i) => txn({ amount: '12.00' }, 5000 + i));
    const responses = await Promise.all(items.map((t) => post(t)));
    for (const r of responses) expect(r.status).toBe(202);
    const ids = responses.map((r) => r.body.results[0].transactionId as number);
    for (const t of items) await scored(t.id);
    const connection = createRedis(ts.server.config, { forBullmq: true, name: 'test-queue-reader' });
    const queue = new Queue(QUEUES.scoring, { connection, prefix: ts.server.config.REDIS_PREFIX });
    try {
      const jobs = (await queue.getJobs(['completed', 'waiting', 'active', 'delayed', 'failed', 'prioritized']))
        .map((j) => (j.data as { transactionIds: number[] }).transactionIds)
        .filter((jobIds) => jobIds.some((id) => ids.includes(id)));
      // Each id in one job only, however the requests were grouped and gathered (the gathering itself:
      // tests/integration/scoring-queue.test.ts).
      expect(jobs.flat().filter((id) => ids.includes(id)).sort((a, b) => a - b)).toEqual([...ids].sort((a, b) => a - b));
    } finally {
      await queue.close();
      connection.disconnect();
    }
  });

  it('refuses what it must: malformed JSON 400, oversize 413, unknown key 401, wrong scope 403, a session 401', async () => {
    const malformed = await request(ts.server.http).post('/api/v1/transactions').set('Authorization', `Bearer ${key}`).set('Content-Type', 'application/json').send('{"id":');
    expect(malformed.status).toBe(400);
    const huge = await request(ts.server.http)
      .post('/api/v1/transactions')
      .set('Authorization', `Bearer ${key}`)
      .set('Content-Type', 'application/json')
      .send(JSON.stringify({ transactions: [], pad: 'x'.repeat(3 * 1024 * 1024) }));
    expect(huge.status).toBe(413);
    expect((await post(txn(), 'ek_not-a-real-key-at-all')).status).toBe(401);
    expect((await post(txn(), readOnlyKey)).status).toBe(403);
    const agent = request.agent(ts.server.http);
    const token = await csrfToken(agent);
    await agent.post('/api/auth/login').set('X-CSRF-Token', token).send({ email: 'admin@demo.test', password: DEMO_PASSWORD }).expect(200);
    const viaSession = await agent.post('/api/v1/transactions').send(txn());
    expect(viaSession.status).toBe(401);
  });
});

describe('alerts and cases', () => {
  it('raises an alert above the threshold, opens a case for the card, joins later alerts to it, and pushes it live', async () => {
    const { socket, pushed } = await investigatorAlerts();

    const panSeed = 777;
    const first = txn({ amount: '2900.00' }, panSeed);
    const second = txn({ amount: '2800.00', occurredAt: new Date(Date.now() + 1000).toISOString() }, panSeed);
    await post(first).expect(202);
    const v1 = await scored(first.id);
    expect(v1.alerted).toBe(true);
    await post(second).expect(202);
    const v2 = await scored(second.id);
    expect(v2.alerted).toBe(true);
    expect(v2.caseId).toBe(v1.caseId);
    const [c] = await ts.server.db.sequelize.query<{ alert_count: number; status: string; amount_at_risk_minor: number; highest_probability: number }>(
      'SELECT alert_count, status, amount_at_risk_minor, highest_probability FROM cases WHERE id = ?',
      { replacements: [v1.caseId], type: QueryTypes.SELECT },
    );
    expect(Number(c.alert_count)).toBe(2);
    expect(c.status).toBe('new');
    expect(Number(c.amount_at_risk_minor)).toBe(570_000);
    expect(c.highest_probability).toBeCloseTo(Math.max(v1.score.probability, v2.score.probability), 12);
    await waitFor(async () => pushed.length >= 2);
    expect(pushed[0]).toMatchObject({ caseId: v1.caseId, created: true });
    expect(pushed[1]).toMatchObject({ caseId: v1.caseId, created: false });
    socket.close();
  });

  it('scores every transaction of a concurrent load exactly once across two workers', async () => {
    const batches = Array.from({ length: 5 }, (_, b) =>
      Array.from({ length: 100 }, (_, i) => txn({ amount: i % 10 === 0 ? '2500.00' : '10.00' }, 1000 + ((b * 100 + i) % 37))),
    );
    const ids = batches.flat().map((t) => t.id);
    const responses = await Promise.all(batches.map((b) => post({ transactions: b })));
    for (const r of responses) expect(r.status).toBe(202);
    // The same batches again while scoring runs: all duplicates, nothing scored twice.
    const repeats = await Promise.all(batches.map((b) => post({ transactions: b })));
    for (const r of repeats) expect(r.body.results.every((x: { status: string }) => x.status === 'duplicate')).toBe(true);
    await waitFor(async () => {
      const [{ n }] = await ts.server.db.sequelize.query<{ n: number }>(
        "SELECT COUNT(*) AS n FROM transactions WHERE external_id IN (:ids) AND status = 'scored'",
        { replacements: { ids }, type: QueryTypes.SELECT },
      );
      return Number(n) === ids.length;
    }, 30_000);
    const [{ scores, alerts, expected }] = await ts.server.db.sequelize.query<{ scores: number; alerts: number; expected: number }>(
      `SELECT (SELECT COUNT(*) FROM transaction_scores s JOIN transactions t ON t.id = s.transaction_id WHERE t.external_id IN (:ids)) AS scores,
              (SELECT COUNT(*) FROM alerts a JOIN transactions t ON t.id = a.transaction_id WHERE t.external_id IN (:ids)) AS alerts,
              (SELECT COUNT(*) FROM transaction_scores s JOIN transactions t ON t.id = s.transaction_id WHERE t.external_id IN (:ids) AND s.alerted) AS expected`,
      { replacements: { ids }, type: QueryTypes.SELECT },
    );
    expect(Number(scores)).toBe(ids.length);
    expect(Number(alerts)).toBe(Number(expected));
    const [{ open }] = await ts.server.db.sequelize.query<{ open: number }>(
      'SELECT MAX(c) AS open FROM (SELECT COUNT(*) AS c FROM cases WHERE open_card_id IS NOT NULL GROUP BY card_id) x',
      { type: QueryTypes.SELECT },
    );
    expect(Number(open)).toBe(1);
  });
});

describe('synchronous decision', () => {
  it('scores in-process, recommends an action by band, and records the transaction for the queue', async () => {
    const t = txn({ amount: '2950.00' }, 31337);
    const res = await request(ts.server.http).post('/api/v1/decisions').set('Authorization', `Bearer ${key}`).send(t);
    expect(res.status).toBe(200);
    expect(['approve', 'review', 'decline']).toContain(res.body.action);
    expect(res.body.reasons.length).toBeGreaterThan(0);
    const view = await scored(t.id);
    // The stored score is the decision's own, so it agrees with the answer.
    expect(view.score.probability).toBeCloseTo(res.body.probability, 12);
    const repeat = await request(ts.server.http).post('/api/v1/decisions').set('Authorization', `Bearer ${key}`).send(t);
    expect(repeat.body.duplicate).toBe(true);
    expect(repeat.body.probability).toBeCloseTo(res.body.probability, 12);
  });

  it('stores the decision with its score, alert and case in one commit: scored when the answer arrives, pushed live, never queued for the worker', async () => {
    const { socket, pushed } = await investigatorAlerts();

    // An amount this large alerts with the test champion (as in "alerts and cases" above).
    const t = txn({ amount: '2975.00' }, 42424);
    const res = await request(ts.server.http).post('/api/v1/decisions').set('Authorization', `Bearer ${key}`).send(t);
    expect(res.status).toBe(200);
    // No waiting: the answer comes after the commit that stored the score.
    const view = (await get(t.id)).body.transaction;
    expect(view.status).toBe('scored');
    expect(view.score.probability).toBeCloseTo(res.body.probability, 12);
    expect(view.score.modelVersionId).toBe(res.body.modelVersionId);
    expect(view.alerted).toBe(true);
    expect(view.caseId).not.toBeNull();
    await waitFor(async () => pushed.some((e) => e.caseId === view.caseId) || null);
    socket.close();

    const [{ scores, features, alerts }] = await ts.server.db.sequelize.query<{ scores: number; features: number; alerts: number }>(
      `SELECT (SELECT COUNT(*) FROM transaction_scores WHERE transaction_id = :id) AS scores,
              (SELECT COUNT(*) FROM transaction_features WHERE transaction_id = :id) AS features,
              (SELECT COUNT(*) FROM alerts WHERE transaction_id = :id) AS alerts`,
      { replacements: { id: view.transactionId }, type: QueryTypes.SELECT },
    );
    expect([Number(scores), Number(features), Number(alerts)]).toEqual([1, 1, 1]);

    // No scoring job names it (completed jobs are kept for an hour, so a job that ran would be found).
    const connection = createRedis(ts.server.config, { forBullmq: true, name: 'test-queue-reader' });
    const queue = new Queue(QUEUES.scoring, { connection, prefix: ts.server.config.REDIS_PREFIX });
    try {
      const jobs = await queue.getJobs(['completed', 'waiting', 'active', 'delayed', 'failed', 'prioritized']);
      expect(jobs.length).toBeGreaterThan(0);
      expect(jobs.some((j) => (j.data as { transactionIds: number[] }).transactionIds.includes(view.transactionId))).toBe(false);
    } finally {
      await queue.close();
      connection.disconnect();
    }
  });
});
