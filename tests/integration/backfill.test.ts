import { request as httpRequest } from 'node:http';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { QueryTypes } from 'sequelize';
import { stringify } from 'csv-stringify/sync';
import { parse } from 'csv-parse/sync';
import type { Socket } from 'socket.io-client';
import { BACKFILL_COLUMNS, BACKFILL_MAX_BYTES, BACKFILL_PROGRESS_EVENT, type BackfillProgressEvent } from '../../shared/src/api/backfill';
import { STALE_AFTER_MS } from '../../server/src/backfill/import-repository';
import { connectSocket, csrfToken, DEMO_PASSWORD, sessionCookieOf, signedInAgent, startTestServer, type Agent, type TestServer } from './helpers/test-server';
import { testPan } from './helpers/transactions';

let ts: TestServer;
let scientist: { agent: Agent; csrf: string; cookie: string; userId: number };
let admin: { agent: Agent; csrf: string };
let run = 0;

const COLUMNS = BACKFILL_COLUMNS;
type Row = Partial<Record<string, string>>;

/** A valid history row (fixture values); tests override fields to make it bad. */
function row(over: Row = {}, panSeed = 1): Row {
  run += 1;
  return {
    id: `bf-${Date.now().toString(36)}-${run}`,
    occurredAt: '2026-03-02T10:00:00Z',
    amount: '25.00',
    currency: 'USD',
    'card.number': testPan(panSeed),
    'card.cardholderId': `ch-${panSeed}`,
    'merchant.id': 'm-kettle',
    'merchant.name': 'Kettle & Pine Grocers',
    'merchant.mcc': '5411',
    'merchant.country': 'US',
    cardPresent: 'true',
    ...over,
  };
}

const csv = (rows: Row[], columns: readonly string[] = COLUMNS) =>
  stringify(rows.map((r) => columns.map((c) => r[c] ?? ''))!, { header: true, columns: [...columns] });

function upload(body: string | Buffer, o: { agent?: Agent; csrf?: string | null; filename?: string; contentType?: string; clientRef?: string } = {}) {
  const agent = o.agent ?? scientist.agent;
  let req = agent.post('/api/backfill/transactions');
  const token = o.csrf === undefined ? scientist.csrf : o.csrf;
  if (token) req = req.set('X-CSRF-Token', token);
  if (o.clientRef) req = req.field('clientRef', o.clientRef);
  return req.attach('file', Buffer.isBuffer(body) ? body : Buffer.from(body), {
    filename: o.filename ?? 'history.csv',
    contentType: o.contentType ?? 'text/csv',
  });
}

const q = <T extends object>(sql: string, replacements: unknown[] = []) =>
  ts.server.db.sequelize.query<T>(sql, { replacements, type: QueryTypes.SELECT });

async function countsFor(ids: string[]) {
  const [t] = await q<{ n: number }>('SELECT COUNT(*) AS n FROM transactions WHERE external_id IN (?)', [ids]);
  const [f] = await q<{ n: number }>('SELECT COUNT(*) AS n FROM transaction_features f JOIN transactions t ON t.id = f.transaction_id WHERE t.external_id IN (?)', [ids]);
  const [l] = await q<{ n: number }>('SELECT COUNT(*) AS n FROM labels l JOIN transactions t ON t.id = l.transaction_id WHERE t.external_id IN (?)', [ids]);
  return { transactions: Number(t.n), features: Number(f.n), labels: Number(l.n) };
}

async function report(id: number, agent = scientist.agent) {
  const res = await agent.get(`/api/backfill/${id}/errors.csv`).buffer(true).parse((r, cb) => {
    let text = '';
    r.setEncoding('utf8');
    r.on('data', (c: string) => (text += c));
    r.on('end', () => cb(null, text));
  });
  return { res, text: res.body as string, rows: parse(res.body as string, { bom: true, columns: true }) as { row: string; id: string; field: string; message: string }[] };
}

beforeAll(async () => {
  ts = await startTestServer();
  const agent = request.agent(ts.server.http);
  const token = await csrfToken(agent);
  const login = await agent.post('/api/auth/login').set('X-CSRF-Token', token).send({ email: 'scientist@demo.test', password: DEMO_PASSWORD });
  expect(login.status).toBe(200);
  scientist = { agent, csrf: login.body.csrfToken, cookie: sessionCookieOf(login)!, userId: login.body.user.id };
  admin = await signedInAgent(ts, 'admin');
});
afterAll(async () => {
  await ts?.close();
});

describe('CSV back-fill', () => {
  // Fixture rows. Each bad row breaks the contract in a way the contract names (the checked paths).
  const pan = testPan(7001);
  const earlier = row({ occurredAt: '2026-03-02T10:00:00Z', amount: '25.00', label: 'fraud', labelReportedAt: '2026-03-20T08:00:00Z' }, 7001);
  const later = row({ occurredAt: '2026-03-02T10:10:00Z', amount: '40.00', label: 'legit' }, 7001);
  const unlabelled = row({ channel: 'ecommerce', cardPresent: 'false', ip: '203.0.113.9', 'location.lat': '40.7', 'location.lon': '-74.0' }, 7002);
  const formula = row({ 'merchant.name': '=HYPERLINK("http://attacker.example/x","Refund")' }, 7003);
  const badAmount = row({ amount: '12.345' }, 7004);
  const badMerchant = row({ 'merchant.mcc': '54', 'merchant.country': 'ZZ' }, 7005);
  const luhnPan = testPan(7006);
  const badCard = row({ 'card.number': luhnPan.slice(0, -1) + String((Number(luhnPan.at(-1)) + 1) % 10) }, 7006);
  const dashId = row({ id: `-cmd-${Date.now().toString(36)}`, currency: '' }, 7007);
  // The later row comes first in the file: features follow time, not file order.
  const good = [later, earlier, unlabelled, formula];
  const bad = [badAmount, badMerchant, badCard, dashId];
  const body = csv([later, badAmount, earlier, badMerchant, unlabelled, badCard, formula, dashId]) + `${'short-row,2026-03-02T10:00:00Z'}\n`;
  const ids = [...good, ...bad].map((r) => r.id!);
  let firstId = 0;

  it('stores good rows as historical with features and labels, and reports exactly the bad rows', async () => {
    const res = await upload(body);
    expect(res.status).toBe(200);
    const summary = res.body.import;
    firstId = summary.id;
    expect(summary).toMatchObject({ status: 'completed', fileName: 'history.csv', error: null });
    expect(summary.counts).toMatchObject({ rowsRead: 9, accepted: 4, duplicate: 0, rejected: 5, labelsAdded: 2, bytesRead: Buffer.byteLength(body) });
    expect(summary.errorReportUrl).toBe(`/api/backfill/${summary.id}/errors.csv`);

    const stored = await q<{ external_id: string; status: string; source: string; merchant_name: string }>(
      'SELECT external_id, status, source, merchant_name FROM transactions WHERE external_id IN (?)',
      [ids],
    );
    expect(stored.map((s) => s.external_id).sort()).toEqual(good.map((g) => g.id).sort());
    expect(new Set(stored.map((s) => `${s.status}/${s.source}`))).toEqual(new Set(['historical/csv']));
    // Stored as the text it is; neutralising is for what goes out as CSV.
    expect(stored.find((s) => s.external_id === formula.id)!.merchant_name).toBe(formula['merchant.name']);
    expect((await countsFor(ids)).features).toBe(4);

    // Velocity in time order: the later transaction sees the earlier one (same card, 10 minutes before).
    const [f] = await q<{ features: string }>('SELECT f.features FROM transaction_features f JOIN transactions t ON t.id = f.transaction_id WHERE t.external_id = ?', [later.id]);
    const features = JSON.parse(f.features);
    expect(features).toMatchObject({ amount: 40, txn_count_1h: 1, amount_sum_1h: 25, seconds_since_prev: 600 });

    const labels = await q<{ external_id: string; label: string; source: string; reported_at: Date; created_by: number }>(
      'SELECT t.external_id, l.label, l.source, l.reported_at, l.created_by FROM labels l JOIN transactions t ON t.id = l.transaction_id WHERE t.external_id IN (?)',
      [ids],
    );
    expect(labels).toHaveLength(2);
    const fraud = labels.find((l) => l.external_id === earlier.id)!;
    expect(fraud).toMatchObject({ label: 'fraud', source: 'backfill', created_by: scientist.userId });
    expect(new Date(fraud.reported_at).toISOString()).toBe('2026-03-20T08:00:00.000Z');
    const legit = labels.find((l) => l.external_id === later.id)!;
    expect(legit.label).toBe('legitimate');
    // No reported time in the file: the time of the import.
    expect(new Date(legit.reported_at).getTime()).toBeGreaterThanOrEqual(new Date(summary.startedAt).getTime() - 1000);

    const { res: r, text, rows } = await report(summary.id);
    expect(r.status).toBe(200);
    expect(r.headers['content-type']).toMatch(/^text\/csv/);
    expect(r.headers['content-disposition']).toMatch(/^attachment;/);
    // Lines of the file (header = 1): badAmount 3, badMerchant 5, badCard 7, dashId 9, short row 10.
    expect(rows.map((x) => [x.row, x.field])).toEqual([
      ['3', 'amount'],
      ['5', 'merchant.mcc'],
      ['5', 'merchant.country'],
      ['7', 'card.number'],
      ['9', 'currency'],
      ['10', '(row)'],
    ]);
    expect(rows[0].id).toBe(badAmount.id);
    // OWASP CSV Injection: a cell starting with "-" is prefixed with an apostrophe.
    expect(rows[4].id).toBe(`'${dashId.id}`);
    for (const p of [pan, luhnPan, badCard['card.number']!, testPan(7004), testPan(7005)]) expect(text).not.toContain(p);
    expect(text).not.toMatch(/\d{12,}/);
  });

  it('answers a second upload of the same file with duplicates only, adding nothing', async () => {
    const before = await countsFor(ids);
    const res = await upload(body);
    expect(res.status).toBe(200);
    expect(res.body.import.id).not.toBe(firstId);
    expect(res.body.import.counts).toMatchObject({ rowsRead: 9, accepted: 0, duplicate: 4, rejected: 5, labelsAdded: 0 });
    expect(await countsFor(ids)).toEqual(before);
  });

  it('records a late label on a transaction already stored, once, and refuses an id stored for another card', async () => {
    const late: Row = { ...unlabelled, label: '1', labelReportedAt: '2026-04-01T00:00:00Z' };
    const otherCard: Row = { ...formula, 'card.number': testPan(7999), 'card.cardholderId': 'ch-7999' };
    const file = csv([late, otherCard]);
    const first = await upload(file);
    expect(first.body.import.counts).toMatchObject({ rowsRead: 2, accepted: 0, duplicate: 1, rejected: 1, labelsAdded: 1 });
    const again = await upload(file);
    expect(again.body.import.counts).toMatchObject({ duplicate: 1, rejected: 1, labelsAdded: 0 });
    const labels = await q<{ label: string }>('SELECT l.label FROM labels l JOIN transactions t ON t.id = l.transaction_id WHERE t.external_id = ?', [late.id]);
    expect(labels).toEqual([{ label: 'fraud' }]);
    const { rows } = await report(again.body.import.id);
    expect(rows).toEqual([expect.objectContaining({ row: '3', id: formula.id, field: 'id' })]);
  });

  it('refuses files that are not CSV with 415, before reading a row', async () => {
    const png = Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 0x0d]);
    const res = await upload(png, { filename: 'chart.png', contentType: 'image/png' });
    expect(res.status).toBe(415);
    expect(res.body.error.message).toMatch(/CSV/);
    const json = await scientist.agent.post('/api/backfill/transactions').set('X-CSRF-Token', scientist.csrf).send({ rows: [] });
    expect(json.status).toBe(415);
    // Named .csv but binary (a spreadsheet saved under the wrong name).
    const disguised = await upload(Buffer.concat([Buffer.from('PK\u0003\u0004'), Buffer.alloc(64)]), { filename: 'history.csv', contentType: 'application/vnd.ms-excel' });
    expect(disguised.status).toBe(415);
    expect(disguised.body.error.code).toBe('not_csv');
  });

  it('refuses a header with unknown columns, naming them, and records the failed run', async () => {
    const res = await upload(csv([row()], [...COLUMNS, 'card.cvv']));
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('invalid_header');
    expect(res.body.error.message).toContain('"card.cvv"');
    expect(res.body.import).toMatchObject({ status: 'failed', counts: { rowsRead: 0, accepted: 0 } });
    const missing = await upload('id,amount\nx,1\n');
    expect(missing.status).toBe(400);
    expect(missing.body.error.message).toMatch(/lacks required columns: occurredAt/);
    const empty = await upload('');
    expect(empty.body.error.code).toBe('empty_file');
  });

  it('keeps others out: no session 401, investigator 403, missing CSRF token 403', async () => {
    const file = csv([row()]);
    const anon = request.agent(ts.server.http);
    const anonToken = await csrfToken(anon);
    const anonRes = await anon.post('/api/backfill/transactions').set('X-CSRF-Token', anonToken).attach('file', Buffer.from(file), { filename: 'h.csv', contentType: 'text/csv' });
    expect(anonRes.status).toBe(401);
    const inv = await signedInAgent(ts, 'investigator');
    expect((await upload(file, { agent: inv.agent, csrf: inv.csrf })).status).toBe(403);
    const noCsrf = await upload(file, { csrf: null });
    expect(noCsrf.status).toBe(403);
    expect(noCsrf.body.error.code).toBe('csrf_invalid');
  });

  it('lists runs to their uploader and to admins, and keeps one person’s report from another', async () => {
    const mine = await scientist.agent.get('/api/backfill').expect(200);
    expect(mine.body.imports.map((i: { id: number }) => i.id)).toContain(firstId);
    const all = await admin.agent.get('/api/backfill').expect(200);
    expect(all.body.imports.map((i: { id: number }) => i.id)).toContain(firstId);
    expect((await admin.agent.get(`/api/backfill/${firstId}`)).body.import.counts.accepted).toBe(4);
    expect((await report(firstId, admin.agent)).res.status).toBe(200);
    // The admin's own run is not the scientist's to read.
    const adminRun = await upload(csv([row({ amount: 'x' })]), { agent: admin.agent, csrf: admin.csrf });
    expect(adminRun.status).toBe(200);
    expect((await scientist.agent.get(`/api/backfill/${adminRun.body.import.id}`)).status).toBe(404);
    expect((await scientist.agent.get(`/api/backfill/${adminRun.body.import.id}/errors.csv`)).status).toBe(404);
    const audit = await q<{ actor_label: string; outcome: string; details: string }>(
      "SELECT actor_label, outcome, details FROM audit_log WHERE action = 'backfill.import' AND target_id = ?",
      [String(firstId)],
    );
    expect(audit).toHaveLength(1);
    expect(audit[0]).toMatchObject({ actor_label: 'scientist@demo.test', outcome: 'success' });
    expect(JSON.parse(audit[0].details)).toMatchObject({ fileName: 'history.csv', counts: { accepted: 4, rejected: 5 } });
  });

  it('sends progress to the uploader’s sockets only, ending with the summary', async () => {
    const listen = async (cookie: string) => {
      const socket: Socket = connectSocket(ts.baseUrl, cookie);
      await new Promise((resolve, reject) => {
        socket.on('hello', resolve);
        socket.on('connect_error', reject);
      });
      const events: BackfillProgressEvent[] = [];
      socket.on(BACKFILL_PROGRESS_EVENT, (e: BackfillProgressEvent) => events.push(e));
      return { socket, events };
    };
    const own = await listen(scientist.cookie);
    const adminLogin = request.agent(ts.server.http);
    const adminToken = await csrfToken(adminLogin);
    const login = await adminLogin.post('/api/auth/login').set('X-CSRF-Token', adminToken).send({ email: 'admin@demo.test', password: DEMO_PASSWORD });
    expect(login.status).toBe(200);
    const other = await listen(sessionCookieOf(login)!);

    const rows = Array.from({ length: 1200 }, (_, i) => row({ occurredAt: new Date(Date.UTC(2026, 2, 5, 0, 0, i)).toISOString() }, 8000 + (i % 40)));
    const res = await upload(csv(rows), { clientRef: 'page-ref-0001' });
    expect(res.status).toBe(200);
    await new Promise((r) => setTimeout(r, 300));
    own.socket.close();
    other.socket.close();

    const final = res.body.import;
    expect(final.counts).toMatchObject({ rowsRead: 1200, accepted: 1200 });
    expect(own.events.length).toBeGreaterThanOrEqual(2);
    expect(new Set(own.events.map((e) => e.id))).toEqual(new Set([final.id]));
    expect(own.events.every((e) => e.clientRef === 'page-ref-0001')).toBe(true);
    expect(own.events[0].status).toBe('running');
    const last = own.events.at(-1)!;
    expect(last.status).toBe('completed');
    expect(last.counts).toEqual(final.counts);
    const read = own.events.map((e) => e.counts.rowsRead);
    expect(read).toEqual([...read].sort((a, b) => a - b));
    expect(other.events).toEqual([]);
  });
  /** Starts a raw multipart upload as the scientist, so a test can stop half-way or lie about the length. */
  function rawUpload(headers: Record<string, string | number>) {
    const boundary = 'edgecase-test-boundary';
    const url = new URL('/api/backfill/transactions', ts.baseUrl);
    const req = httpRequest(url, {
      method: 'POST',
      headers: { Cookie: scientist.cookie, 'X-CSRF-Token': scientist.csrf, 'Content-Type': `multipart/form-data; boundary=${boundary}`, ...headers },
    });
    const response = new Promise<{ status: number; body: string }>((resolve, reject) => {
      req.on('response', (res) => {
        let body = '';
        res.on('data', (c) => (body += c));
        res.on('end', () => resolve({ status: res.statusCode ?? 0, body }));
      });
      req.on('error', reject);
    });
    const partHead = `--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="big.csv"\r\nContent-Type: text/csv\r\n\r\n`;
    return { req, response, partHead };
  }

  it('refuses a file declared larger than the limit with 413 without reading it', async () => {
    const { req, response, partHead } = rawUpload({ 'Content-Length': BACKFILL_MAX_BYTES + 10_000_000 });
    req.write(partHead + csv([row()]));
    const res = await response;
    req.destroy();
    expect(res.status).toBe(413);
    expect(JSON.parse(res.body).error.code).toBe('file_too_large');
  });

  it('records an upload cut off mid-file as failed, keeping the rows that arrived whole', async () => {
    const before = (await scientist.agent.get('/api/backfill')).body.imports.length;
    const { req, response, partHead } = rawUpload({ 'Transfer-Encoding': 'chunked' });
    // No answer is expected: the client is gone.
    response.catch(() => undefined);
    const first = row();
    req.write(partHead + csv([first]) + 'half-a-row,2026');
    await new Promise((r) => setTimeout(r, 300));
    req.destroy();
    let latest: { status: string; error: { code: string } | null; counts: { accepted: number } } | undefined;
    for (let i = 0; i < 50 && latest?.status !== 'failed'; i += 1) {
      await new Promise((r) => setTimeout(r, 100));
      const list = (await scientist.agent.get('/api/backfill')).body.imports;
      latest = list.length > before ? list[0] : undefined;
    }
    expect(latest).toMatchObject({ status: 'failed', error: { code: 'upload_aborted' }, counts: { accepted: 1 } });
    expect((await countsFor([first.id!])).transactions).toBe(1);
  });

  it('shows a run that stopped reporting as interrupted', async () => {
    const stale = new Date(Date.now() - STALE_AFTER_MS - 60_000);
    await ts.server.db.sequelize.query(
      "INSERT INTO backfill_imports (user_id, file_name, status, started_at, updated_at) VALUES (?, 'stale.csv', 'running', ?, ?)",
      { replacements: [scientist.userId, stale, stale], type: QueryTypes.INSERT },
    );
    const list = (await scientist.agent.get('/api/backfill')).body.imports as { fileName: string; status: string }[];
    expect(list.find((r) => r.fileName === 'stale.csv')?.status).toBe('interrupted');
  });
});
