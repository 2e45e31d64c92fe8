/**
 * Promotion and rollback under four eyes, live: a data scientist files a
 * request with a reason, a supervisor approves, the roles change in one
 * transaction, the audit log records it, and the running scoring worker
 * scores the next transaction with the new champion (no restart).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { QueryTypes } from 'sequelize';
import { createApiKey } from '../../server/src/api-keys/api-key-repository';
import { insertModelVersion } from '../../server/src/model-registry/model-repository';
import { createScoringWorker } from '../../workers/src/scoring.worker';
import { signedInAgent, startTestServer, type Agent, type TestServer } from './helpers/test-server';
import { fixtureModel, installChampion } from './helpers/champion';
import { txn } from './helpers/transactions';

let ts: TestServer;
let key: string;
let scoring: Awaited<ReturnType<typeof createScoringWorker>>;
let ds: { agent: Agent; csrf: string };
let sup: { agent: Agent; csrf: string };
let first: number;
let second: number;

async function waitFor<T>(fn: () => Promise<T | null | undefined | false>, timeoutMs = 15_000): Promise<T> {
  const end = Date.now() + timeoutMs;
  for (;;) {
    const v = await fn();
    if (v) return v;
    if (Date.now() > end) throw new Error('timed out waiting');
    await new Promise((r) => setTimeout(r, 50));
  }
}

/** Posts one transaction through the ingest API and returns the version that scored it. */
async function scoredBy(panSeed: number): Promise<number> {
  const t = txn({}, panSeed);
  const res = await request(ts.server.http).post('/api/v1/transactions').set('Authorization', `Bearer ${key}`).send(t);
  expect(res.status).toBe(202);
  return waitFor(async () => {
    const [row] = await ts.server.db.sequelize.query<{ model_version_id: number }>(
      'SELECT s.model_version_id FROM transaction_scores s JOIN transactions t ON t.id = s.transaction_id WHERE t.external_id = ?',
      { replacements: [t.id], type: QueryTypes.SELECT },
    );
    return row ? Number(row.model_version_id) : null;
  });
}

const roles = async () =>
  Object.fromEntries(
    (await ts.server.db.sequelize.query<{ id: number; role: string }>('SELECT id, role FROM model_versions WHERE id IN (?, ?)', {
      replacements: [first, second],
      type: QueryTypes.SELECT,
    })).map((r) => [Number(r.id), r.role]),
  );

const file = (modelVersionId: number, reason = 'Higher PR AUC on the last four weeks and fewer alerts at the same recall.') =>
  ds.agent.post('/api/promotions').set('X-CSRF-Token', ds.csrf).send({ modelVersionId, reason });
const decide = (id: number, decision: 'approve' | 'reject', note = '', who = sup) =>
  who.agent.post(`/api/promotions/${id}/decision`).set('X-CSRF-Token', who.csrf).send({ decision, note });

beforeAll(async () => {
  ts = await startTestServer();
  first = await installChampion(ts.server.db, `promo-a-${Date.now().toString(36)}`);
  second = await insertModelVersion(ts.server.db, { label: `promo-b-${Date.now().toString(36)}`, role: 'challenger', model: fixtureModel() });
  key = (await createApiKey(ts.server.db, { name: 'promotion it', scopes: ['transactions:write', 'transactions:read'] })).key;
  scoring = await createScoringWorker(ts.server.config, ts.server.db, 2);
  ds = await signedInAgent(ts, 'data_scientist');
  sup = await signedInAgent(ts, 'supervisor');
}, 60_000);

afterAll(async () => {
  await scoring?.close();
  await ts?.close();
});

describe('champion and challenger on live traffic', () => {
  it('counts the alerts each would raise on the same transactions and their precision and recall on labels since', async () => {
    // Three transactions while the challenger scores in shadow; the first gets a fraud label afterwards.
    const t1 = await scoredBy(201);
    expect(t1).toBe(first);
    await scoredBy(202);
    await scoredBy(203);
    const rows = await ts.server.db.sequelize.query<{ transaction_id: number; champ: number; chal: number }>(
      `SELECT s.transaction_id, s.probability AS champ, h.probability AS chal FROM transaction_scores s
       JOIN shadow_scores h ON h.transaction_id = s.transaction_id AND h.model_version_id = ?
       WHERE s.model_version_id = ? ORDER BY s.transaction_id`,
      { replacements: [second, first], type: QueryTypes.SELECT },
    );
    expect(rows).toHaveLength(3);
    await ts.server.db.sequelize.query(
      "INSERT INTO labels (transaction_id, label, fraud_type, source, reported_at, created_at) VALUES (?, 'fraud', 'card_not_present', 'chargeback', UTC_TIMESTAMP(3), UTC_TIMESTAMP(3))",
      { replacements: [rows[0].transaction_id], type: QueryTypes.INSERT },
    );
    const res = await ds.agent.get('/api/models/shadow?days=1').expect(200);
    const thr = res.body.threshold as number;
    // Worked out here from the stored scores: an alert is p >= threshold; one labelled transaction, fraud.
    const alerts = (k: 'champ' | 'chal') => rows.filter((r) => r[k] >= thr).length;
    const caught = (k: 'champ' | 'chal') => (rows[0][k] >= thr ? 1 : 0);
    expect(res.body).toMatchObject({ transactions: 3, labelled: 1, fraud: 1, bothAlerted: rows.filter((r) => r.champ >= thr && r.chal >= thr).length });
    expect(res.body.champion).toMatchObject({ id: first, alerts: alerts('champ'), fraudCaught: caught('champ'), recall: caught('champ') });
    expect(res.body.challenger).toMatchObject({ id: second, alerts: alerts('chal'), fraudCaught: caught('chal'), recall: caught('chal') });
    expect(res.body.champion.precision).toBe(caught('champ') === 1 ? 1 : null);
  });
});

describe('promotion', () => {
  it('needs a written reason, and a supervisor to decide', async () => {
    const short = await file(second, 'better');
    expect(short.status).toBe(400);
    expect(short.body.error.fields[0].path).toBe('reason');
    const byScientist = await decide(1, 'approve', '', ds);
    expect(byScientist.status).toBe(403);
  });

  it('takes effect in the running scoring worker at approval: the next transaction is scored by the new champion', async () => {
    expect(await scoredBy(101)).toBe(first);
    const filed = await file(second);
    expect(filed.status).toBe(201);
    expect(filed.body.request).toMatchObject({ kind: 'promote', status: 'pending', modelVersion: { id: second }, fromChampion: { id: first } });
    // Filing changes nothing yet.
    expect(await scoredBy(102)).toBe(first);

    const approved = await decide(filed.body.request.id, 'approve', 'Checked the comparison page with the team.');
    expect(approved.status).toBe(200);
    expect(approved.body.request).toMatchObject({ status: 'approved', decidedBy: { displayName: expect.any(String) } });
    expect(await roles()).toEqual({ [first]: 'retired', [second]: 'champion' });
    expect(await scoredBy(103)).toBe(second);

    const audit = await ts.server.db.sequelize.query<{ action: string; actor_label: string }>(
      "SELECT action, actor_label FROM audit_log WHERE target_type = 'model_version' AND target_id = ? ORDER BY id",
      { replacements: [String(second)], type: QueryTypes.SELECT },
    );
    expect(audit.map((a) => a.action)).toEqual(['model.promote.request', 'model.promote.approve']);
    expect(audit[1].actor_label).toBe('supervisor@demo.test');
  });

  it('rolls back to the earlier version the same way', async () => {
    const filed = await file(first, 'Alert volume doubled overnight after the promotion; back to the previous champion.');
    expect(filed.body.request.kind).toBe('rollback');
    const again = await file(first);
    expect(again.status).toBe(409);
    const rejectedWithoutNote = await decide(filed.body.request.id, 'reject');
    expect(rejectedWithoutNote.status).toBe(400);
    expect((await decide(filed.body.request.id, 'approve')).status).toBe(200);
    expect(await roles()).toEqual({ [first]: 'champion', [second]: 'retired' });
    expect(await scoredBy(104)).toBe(first);
    expect((await decide(filed.body.request.id, 'approve')).status).toBe(409);
  });

  it('refuses to apply a request filed against a champion that has changed since', async () => {
    const stale = await file(second, 'Request filed before somebody else changed the champion: must not apply.');
    const third = await insertModelVersion(ts.server.db, { label: `promo-c-${Date.now().toString(36)}`, role: 'candidate', model: fixtureModel() });
    const other = await file(third, 'A third version goes first, which makes the earlier request stale.');
    expect((await decide(other.body.request.id, 'approve')).status).toBe(200);
    const res = await decide(stale.body.request.id, 'approve');
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('champion_changed');
    expect(await scoredBy(105)).toBe(third);
  });
});
