import { mkdtemp, readdir, readFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { QueryTypes } from 'sequelize';
import { createApiKey } from '../../server/src/api-keys/api-key-repository';
import { hashPassword } from '../../server/src/auth/password';
import { createUser } from '../../server/src/auth/user-repository';
import { createScoringWorker } from '../../workers/src/scoring.worker';
import { createMailWorker } from '../../workers/src/mail.worker';
import { createOutgoingWorker } from '../../workers/src/outgoing.worker';
import { startSmtpCatcher, type SmtpCatcherHandle } from '../../scripts/services/smtp-catcher';
import { signedInAgent, startTestServer, type Agent, type TestServer } from './helpers/test-server';
import { installChampion } from './helpers/champion';
import { txn } from './helpers/transactions';
import { freePort, waitFor } from './helpers/net';

let ts: TestServer;
let key: string;
let catcher: SmtpCatcherHandle;
let mailDir: string;
const closers: (() => Promise<unknown>)[] = [];
let inv: { agent: Agent; csrf: string };
let inv2: { agent: Agent; csrf: string };
let sup: { agent: Agent; csrf: string };

let panSeed = 50_000;
/** Posts a high-risk transaction on a fresh card and returns its case id once scored. */
async function newCase(amount = '2900.00', seed = (panSeed += 1)): Promise<number> {
  const t = txn({ amount, deviceId: `dev-${seed % 3}` }, seed);
  await request(ts.server.http).post('/api/v1/transactions').set('Authorization', `Bearer ${key}`).send(t).expect(202);
  return waitFor(async () => {
    const r = await request(ts.server.http).get(`/api/v1/transactions/${t.id}`).set('Authorization', `Bearer ${key}`);
    return r.body.transaction?.caseId ?? null;
  });
}

const post = (who: { agent: Agent; csrf: string }, url: string, body: object = {}) => who.agent.post(url).set('X-CSRF-Token', who.csrf).send(body);

beforeAll(async () => {
  ts = await startTestServer();
  await installChampion(ts.server.db);
  key = (await createApiKey(ts.server.db, { name: 'cases it', scopes: ['transactions:write', 'transactions:read'] })).key;
  mailDir = await mkdtemp(path.join(tmpdir(), 'edgecase-mail-'));
  catcher = await startSmtpCatcher({ dir: mailDir, port: await freePort() });
  const scoring = await createScoringWorker(ts.server.config, ts.server.db, 2);
  const mail = createMailWorker({ ...ts.server.config, SMTP_PORT: catcher.port }, ts.server.db);
  const outgoing = createOutgoingWorker(ts.server.config, ts.server.db);
  closers.push(() => scoring.close(), () => mail.close(), () => outgoing.close(), () => catcher.stop());
  const email = `second-investigator-${Date.now()}@demo.test`;
  await createUser(ts.server.db, { email, displayName: 'Second Investigator', role: 'investigator', passwordHash: await hashPassword('demo-password') });
  inv = await signedInAgent(ts, 'investigator');
  inv2 = await signedInAgent(ts, email);
  sup = await signedInAgent(ts, 'supervisor');
});

afterAll(async () => {
  for (const c of closers) await c().catch(() => undefined);
  await ts?.close();
});

describe('queue', () => {
  it('lists open cases sorted and filtered on the server, with the count of matches', async () => {
    const ids = [await newCase('2100.00'), await newCase('2990.00')];
    const res = await inv.agent.get('/api/cases?sort=amount&order=desc&pageSize=200').expect(200);
    expect(res.body.total).toBeGreaterThanOrEqual(2);
    const amounts = res.body.items.map((c: { amountAtRisk: { minor: number } }) => c.amountAtRisk.minor);
    expect([...amounts].sort((a, b) => b - a)).toEqual(amounts);
    expect(res.body.items.map((c: { id: number }) => c.id)).toEqual(expect.arrayContaining(ids));
    const card = res.body.items[0].card;
    expect(card.bin).toMatch(/^\d{6}$/);
    expect(card.last4).toMatch(/^\d{4}$/);
    expect(JSON.stringify(res.body)).not.toMatch(/990099\d{10}/);
    const unassigned = await inv.agent.get('/api/cases?view=unassigned').expect(200);
    expect(unassigned.body.items.every((c: { assignee: unknown }) => c.assignee === null)).toBe(true);
    const bad = await inv.agent.get('/api/cases?sort=nonsense');
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields[0].path).toBe('sort');
  });

  it('lets exactly one of two simultaneous claims win and tells the other who holds it', async () => {
    const id = await newCase();
    const [a, b] = await Promise.all([post(inv, `/api/cases/${id}/claim`), post(inv2, `/api/cases/${id}/claim`)]);
    const statuses = [a.status, b.status].sort();
    expect(statuses).toEqual([200, 409]);
    const loser = a.status === 409 ? a : b;
    expect(loser.body.error.code).toBe('already_claimed');
    expect(loser.body.error.claimedBy.displayName).toMatch(/Ines Varga|Second Investigator/);
    const mine = await (a.status === 200 ? inv : inv2).agent.get('/api/cases?view=mine').expect(200);
    expect(mine.body.items.map((c: { id: number }) => c.id)).toContain(id);
  });
});

describe('case file and actions', () => {
  it('shows reasons, activity and timeline, and records each action', async () => {
    const id = await newCase();
    await post(inv, `/api/cases/${id}/claim`).expect(200);
    const note = await post(inv, `/api/cases/${id}/notes`, { text: '<b>called</b> the cardholder' }).expect(201);
    expect(note.body.note.text).toBe('<b>called</b> the cardholder');
    const file = await inv.agent.get(`/api/cases/${id}`).expect(200);
    const body = file.body;
    expect(body.case.status).toBe('claimed');
    expect(body.alerts.length).toBe(1);
    expect(body.alerts[0].reasons.length).toBeGreaterThan(0);
    expect(body.alerts[0].features.amount).toBe(2900);
    expect(body.activity[0].inThisCase).toBe(true);
    expect(['approve', 'review', 'decline']).toContain(body.recommendedAction);
    expect(body.timeline.map((t: { action: string }) => t.action)).toEqual(expect.arrayContaining(['case.claim', 'case.note']));
    const model = await inv.agent.get(`/api/models/${body.alerts[0].model.id}/scoring-model`).expect(200);
    expect(model.body.model.stumps.length).toBeGreaterThan(0);
  });

  it('stores evidence by content type under a random name and serves it back as an attachment', async () => {
    const id = await newCase();
    await post(inv, `/api/cases/${id}/claim`).expect(200);
    // PNG signature (ISO/IEC 15948 / RFC 2083: 89 50 4E 47 0D 0A 1A 0A) and an IHDR chunk.
    const png = Buffer.concat([Buffer.from('89504e470d0a1a0a0000000d49484452000000010000000108060000001f15c489', 'hex'), Buffer.alloc(64)]);
    const up = await inv.agent.post(`/api/cases/${id}/evidence`).set('X-CSRF-Token', inv.csrf).attach('file', png, { filename: '../../etc/receipt.png', contentType: 'image/png' });
    expect(up.status).toBe(201);
    expect(up.body.evidence.fileName).toBe('receipt.png');
    expect(up.body.evidence.contentType).toBe('image/png');
    const down = await inv.agent.get(`/api/cases/${id}/evidence/${up.body.evidence.id}`).buffer(true).parse((res, cb) => {
      const chunks: Buffer[] = [];
      res.on('data', (c: Buffer) => chunks.push(c));
      res.on('end', () => cb(null, Buffer.concat(chunks)));
    });
    expect(down.status).toBe(200);
    expect(down.headers['content-disposition']).toMatch(/attachment/);
    expect(Buffer.compare(down.body as Buffer, png)).toBe(0);
    const disguised = await inv.agent
      .post(`/api/cases/${id}/evidence`)
      .set('X-CSRF-Token', inv.csrf)
      .attach('file', Buffer.from('<html><script>alert(1)</script></html>'), { filename: 'photo.png', contentType: 'image/png' });
    expect(disguised.status).toBe(415);
    const none = await inv.agent.post(`/api/cases/${id}/evidence`).attach('file', png, { filename: 'x.png' });
    expect(none.status).toBe(403);
  });

  it('e-mails the cardholder through the queue and the local SMTP catcher', async () => {
    const id = await newCase();
    await ts.server.db.sequelize.query(
      "INSERT INTO cardholders (ref, display_name, email, created_at, updated_at) SELECT k.cardholder_ref, 'Test Holder', 'holder@cardholders.demo.test', UTC_TIMESTAMP(3), UTC_TIMESTAMP(3) FROM cases c JOIN cards k ON k.id = c.card_id WHERE c.id = ? ON DUPLICATE KEY UPDATE email = VALUES(email)",
      { replacements: [id], type: QueryTypes.INSERT },
    );
    await post(inv, `/api/cases/${id}/claim`).expect(200);
    const sent = await post(inv, `/api/cases/${id}/contact`, { subject: 'About a recent payment', message: 'Did you make a payment of 2,900.00 today?' });
    expect(sent.status).toBe(201);
    const mail = await waitFor(async () => {
      for (const f of (await readdir(mailDir)).filter((n) => n.endsWith('.json'))) {
        const m = JSON.parse(await readFile(path.join(mailDir, f), 'utf8'));
        if (m.subject === 'About a recent payment') return m;
      }
      return null;
    });
    expect(mail.to).toContain('holder@cardholders.demo.test');
    expect(mail.text).not.toMatch(/990099\d{10}/);
    await waitFor(async () => {
      const r = await inv.agent.get(`/api/cases/${id}`);
      return r.body.messages[0]?.status === 'sent';
    });
  });

  it('blocks the card and records the event for the upstream system', async () => {
    const id = await newCase();
    await post(inv, `/api/cases/${id}/claim`).expect(200);
    const res = await post(inv, `/api/cases/${id}/card`, { action: 'block', reason: 'Cardholder denies the payment' }).expect(200);
    expect(res.body.card.status).toBe('blocked');
    const [ev] = await waitFor(async () => {
      const rows = await ts.server.db.sequelize.query<{ type: string; status: string; payload: string }>(
        "SELECT type, status, payload FROM outgoing_events WHERE payload LIKE ? AND status <> 'pending'",
        { replacements: [`%"caseId":${id},%`], type: QueryTypes.SELECT },
      );
      return rows.length ? rows : null;
    });
    expect(ev.type).toBe('card.blocked');
    // No upstream endpoint is configured in this test: kept as undeliverable, not lost.
    expect(ev.status).toBe('undeliverable');
    expect(ev.payload).not.toMatch(/990099\d{10}/);
  });

  it('closes a case with a disposition, writes a label per alerted transaction and refuses a stale version', async () => {
    const id = await newCase();
    const claimed = await post(inv, `/api/cases/${id}/claim`).expect(200);
    const version = claimed.body.case.version;
    const stale = await post(inv, `/api/cases/${id}/disposition`, { disposition: 'confirmed_fraud', fraudType: 'card_not_present', reason: 'Cardholder denies it', version: version - 1 });
    expect(stale.status).toBe(409);
    expect(stale.body.error.code).toBe('stale_case');
    const missingType = await post(inv, `/api/cases/${id}/disposition`, { disposition: 'confirmed_fraud', reason: 'Cardholder denies it', version });
    expect(missingType.status).toBe(400);
    expect(missingType.body.error.fields[0].path).toBe('fraudType');
    const other = await post(inv2, `/api/cases/${id}/disposition`, { disposition: 'legitimate', reason: 'Looks fine to me', version });
    expect(other.status).toBe(409);
    const done = await post(inv, `/api/cases/${id}/disposition`, {
      disposition: 'confirmed_fraud',
      fraudType: 'card_not_present',
      reason: 'Cardholder denies it',
      amountConfirmed: '2900.00',
      version,
    });
    expect(done.status).toBe(200);
    expect(done.body.case.status).toBe('closed');
    const labels = await ts.server.db.sequelize.query<{ label: string; fraud_type: string; source: string }>(
      'SELECT l.label, l.fraud_type, l.source FROM labels l JOIN alerts a ON a.transaction_id = l.transaction_id WHERE a.case_id = ?',
      { replacements: [id], type: QueryTypes.SELECT },
    );
    expect(labels).toEqual([{ label: 'fraud', fraud_type: 'card_not_present', source: 'disposition' }]);
    const [row] = await ts.server.db.sequelize.query<{ amount_confirmed_minor: number; open_card_id: number | null }>(
      'SELECT amount_confirmed_minor, open_card_id FROM cases WHERE id = ?',
      { replacements: [id], type: QueryTypes.SELECT },
    );
    expect(Number(row.amount_confirmed_minor)).toBe(290_000);
    expect(row.open_card_id).toBeNull();
    const open = await inv.agent.get('/api/cases?pageSize=200').expect(200);
    expect(open.body.items.map((c: { id: number }) => c.id)).not.toContain(id);
    const file = await inv.agent.get(`/api/cases/${id}`).expect(200);
    expect(file.body.timeline.map((t: { action: string }) => t.action)).toContain('case.disposition');
  });

  it('keeps investigators from working a case another one holds, but lets a supervisor step in', async () => {
    const id = await newCase();
    await post(inv, `/api/cases/${id}/claim`).expect(200);
    const blocked = await post(inv2, `/api/cases/${id}/notes`, { text: 'not mine' });
    expect(blocked.status).toBe(201);
    const escalate = await post(inv2, `/api/cases/${id}/escalate`, { reason: 'I want it' });
    expect(escalate.status).toBe(409);
    const bySupervisor = await post(sup, `/api/cases/${id}/escalate`, { reason: 'Taking a look myself' });
    expect(bySupervisor.status).toBe(200);
    expect(bySupervisor.body.case.status).toBe('escalated');
  });
});
