import { readdir, readFile } from 'node:fs/promises';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { QueryTypes } from 'sequelize';
import { stringify } from 'csv-stringify/sync';
import { BACKFILL_REQUIRED_COLUMNS } from '../../../shared/src/api/backfill';
import { luhnCheckDigit } from '../../../shared/src/card/luhn';
import { maskPansInText } from '../../../shared/src/card/pan';
import { loadConfig } from '../../../server/src/config/index';
import type { Database } from '../../../server/src/db/database';
import { DEMO_API_KEY } from '../../../server/src/demo/demo-accounts';
import { createRedis } from '../../../server/src/lib/redis';
import { installChampion } from '../helpers/champion';
import { waitFor } from '../helpers/net';
import { csrfToken, DEMO_PASSWORD, type Agent } from '../helpers/test-server';
import { txn } from '../helpers/transactions';
import { describeFindings, scanAll, type SourceFinding } from './pan-scan';
import { startRealStack, type RealStack } from './real-stack';

/**
 * No full card number anywhere: card numbers are driven through every path
 * that receives one (ingest, decisions, rejected items, the two CSV imports,
 * free text typed by staff, file names), then the database, Redis, the logs
 * of the web and worker processes, the exports and the caught e-mail are
 * scanned for Luhn-valid digit runs (pan-scan.ts). PCI DSS v4.0 requirement 3
 * asks that stored PANs be unreadable and displayed at most as BIN and last
 * four (from memory); the contributor guide promises that the PAN never
 * reaches the database, logs or job payloads.
 */

/**
 * Card numbers under the BINs of the test cards the schemes publish for their
 * sandboxes (from memory: Visa 4111 11, Mastercard 5555 55, Amex 3782 82,
 * Discover 6011 11, JCB 3530 11), with a serial of our own and the Luhn check
 * digit (ISO/IEC 7812-1 Annex B) computed by the shared module.
 */
let serial = 0;
function testCard(bin: '411111' | '555555' | '378282' | '601111' | '353011'): string {
  serial += 1;
  const length = bin === '378282' ? 15 : 16;
  const payload = `${bin}${String(700_000 + serial).padStart(length - 1 - bin.length, '0')}`;
  return payload + luhnCheckDigit(payload);
}
const spaced = (pan: string) => pan.replace(/(\d{4})(?=\d)/g, '$1 ');
const dashed = (pan: string) => pan.replace(/(\d{4})(?=\d)/g, '$1-');

const CARD = {
  single: testCard('411111'),
  batch: [testCard('555555'), testCard('378282'), testCard('601111')],
  decision: testCard('353011'),
  /** An item refused for its amount, with a valid card number. */
  rejected: testCard('411111'),
  /** The item's own number again in its id: refused. */
  inId: testCard('555555'),
  /** Another card's number in the merchant name of an item refused for its currency. */
  elsewhereRejected: testCard('601111'),
  /** Another card's number in the merchant name of a valid item (a refund note an acquirer wrote there). */
  inMerchantName: testCard('353011'),
  caseCard: testCard('411111'),
  lookup: testCard('555555'),
  backfill: [testCard('411111'), testCard('353011')],
  backfillInId: testCard('555555'),
  label: testCard('411111'),
  fileName: testCard('555555'),
  note: testCard('411111'),
  mailSubject: testCard('378282'),
  mailText: testCard('555555'),
  reason: testCard('601111'),
  evidenceName: testCard('411111'),
  signInEmail: testCard('555555'),
};
const ALL_CARDS = Object.values(CARD).flat();

let stack: RealStack;
let startedAt: string;
const api = () => request(stack.baseUrl);
const upstream = (method: 'post' | 'get', url: string) => api()[method](url).set('Authorization', `Bearer ${DEMO_API_KEY}`);

async function signIn(email: string): Promise<{ agent: Agent; csrf: string }> {
  const agent = request.agent(stack.baseUrl);
  const token = await csrfToken(agent);
  const res = await agent.post('/api/auth/login').set('X-CSRF-Token', token).send({ email, password: DEMO_PASSWORD });
  expect(res.status, JSON.stringify(res.body)).toBe(200);
  return { agent, csrf: res.body.csrfToken as string };
}

beforeAll(async () => {
  startedAt = new Date(Date.now() - 1000).toISOString();
  stack = await startRealStack('card-scan', {}, (db) => installChampion(db).then(() => undefined));
}, 180_000);
afterAll(async () => {
  await stack?.stop();
});

/** What the processes were given, then what they kept and said, scanned. */
const exported: { source: string; text: string }[] = [];

async function drive() {
  // Ingest: one transaction, a batch in spaced and dashed spellings, a decision.
  const single = txn({ card: { number: spaced(CARD.single), cardholderId: 'ch-4242' } });
  expect((await upstream('post', '/api/v1/transactions').send(single)).status).toBe(202);
  const batch = CARD.batch.map((n, i) => txn({ card: { number: i === 1 ? dashed(n) : n, cardholderId: `ch-${4300 + i}` } }));
  batch[2].merchant = { id: 'm-2', name: `Refund to ${spaced(CARD.inMerchantName)}`, mcc: '5411', country: 'US' };
  const rejected = [
    txn({ amount: 'twelve', card: { number: CARD.rejected, cardholderId: 'ch-4400' } }),
    { ...txn({ card: { number: CARD.inId, cardholderId: 'ch-4401' } }), id: CARD.inId },
    txn({ currency: 'XXX1', merchant: { id: 'm-1', name: `Shop ${spaced(CARD.elsewhereRejected)}`, mcc: '5411', country: 'US' }, card: { number: CARD.rejected, cardholderId: 'ch-4402' } }),
  ];
  const batchRes = await upstream('post', '/api/v1/transactions').send({ transactions: [...batch, ...rejected] });
  expect(batchRes.status).toBe(202);
  expect((batchRes.body.results as { status: string }[]).map((r) => r.status)).toEqual(['accepted', 'accepted', 'accepted', 'rejected', 'rejected', 'rejected']);
  exported.push({ source: 'ingest answer', text: batchRes.text });
  const decision = await upstream('post', '/api/v1/decisions').send(txn({ card: { number: CARD.decision, cardholderId: 'ch-4500' } }));
  expect(decision.status).toBe(200);
  exported.push({ source: 'decision answer', text: decision.text });
  // An upstream asking for a transaction by a card number (a mistake a client makes): 404, and the URL is logged.
  expect((await upstream('get', `/api/v1/transactions/${CARD.lookup}`)).status).toBe(404);

  // A case on a card, worked by an investigator who types card numbers into free text.
  const risky = txn({ amount: '2900.00', card: { number: CARD.caseCard, cardholderId: 'ch-4600' } });
  expect((await upstream('post', '/api/v1/transactions').send(risky)).status).toBe(202);
  const caseId = await waitFor(async () => (await upstream('get', `/api/v1/transactions/${risky.id}`)).body.transaction?.caseId as number | null, 30_000);
  const inv = await signIn('investigator@demo.test');
  const post = (url: string, body: object) => inv.agent.post(url).set('X-CSRF-Token', inv.csrf).send(body);
  expect((await post(`/api/cases/${caseId}/claim`, {})).status).toBe(200);
  expect((await post(`/api/cases/${caseId}/notes`, { text: `Cardholder read the card out: ${spaced(CARD.note)}, then hung up.` })).status).toBe(201);
  const mail = await post(`/api/cases/${caseId}/contact`, { subject: `Your card ${CARD.mailSubject}`, message: `We saw a payment on ${dashed(CARD.mailText)} today. Was it you?` });
  expect(mail.status, JSON.stringify(mail.body)).toBe(201);
  const evidence = await inv.agent
    .post(`/api/cases/${caseId}/evidence`)
    .set('X-CSRF-Token', inv.csrf)
    .attach('file', Buffer.from('%PDF-1.7\n%%EOF\n'), { filename: `statement ${CARD.evidenceName}.pdf`, contentType: 'application/pdf' });
  expect(evidence.status).toBe(201);
  expect((await post(`/api/cases/${caseId}/card`, { action: 'block', reason: `Blocked, card ${CARD.reason} reported stolen` })).status).toBe(200);
  const file = await inv.agent.get(`/api/cases/${caseId}`).expect(200);
  exported.push({ source: 'case file answer', text: file.text });
  const decided = await post(`/api/cases/${caseId}/disposition`, { disposition: 'confirmed_fraud', fraudType: 'card_not_present', reason: `Confirmed, ${CARD.reason} used abroad`, version: file.body.case.version });
  expect(decided.status, JSON.stringify(decided.body)).toBe(200);

  // A sign-in with a card number for a user name: refused, and not kept readably.
  const anon = request.agent(stack.baseUrl);
  const token = await csrfToken(anon);
  expect((await anon.post('/api/auth/login').set('X-CSRF-Token', token).send({ email: `${CARD.signInEmail}@staff.demo.test`, password: 'x' })).status).toBeGreaterThanOrEqual(400);

  // The two CSV imports, with card numbers in the rows, in a refused id and in the file names.
  const ds = await signIn('scientist@demo.test');
  const header = [...BACKFILL_REQUIRED_COLUMNS];
  const row = (id: string, number: string, amount = '12.50') =>
    header.map((c) => ({ id, occurredAt: '2026-01-02T10:00:00Z', amount, currency: 'USD', 'card.number': number, 'card.cardholderId': 'ch-4700', 'merchant.id': 'm-1', 'merchant.name': 'Back-fill Shop', 'merchant.mcc': '5411', 'merchant.country': 'US', cardPresent: 'true' })[c]);
  const csv = stringify([header, row(`bf-${Date.now()}-1`, CARD.backfill[0]), row(`bf-${Date.now()}-2`, spaced(CARD.backfill[1])), row(CARD.backfillInId, CARD.backfillInId), row(`bf-${Date.now()}-3`, CARD.backfill[0], 'bad')]);
  const bf = await ds.agent.post('/api/backfill/transactions').set('X-CSRF-Token', ds.csrf).attach('file', Buffer.from(csv), { filename: `history ${CARD.fileName}.csv`, contentType: 'text/csv' });
  expect(bf.status, JSON.stringify(bf.body)).toBe(200);
  expect(bf.body.import.counts).toMatchObject({ accepted: 2, rejected: 2 });
  const labels = stringify([['transactionId', 'reportedAt', 'fraudType'], [CARD.label, '2026-01-05', 'card_not_present'], [risky.id, CARD.label, 'card_not_present']]);
  const lb = await ds.agent.post('/api/labels/imports').set('X-CSRF-Token', ds.csrf).attach('file', Buffer.from(labels), { filename: `chargebacks-${CARD.fileName}.csv`, contentType: 'text/csv' });
  expect(lb.status, JSON.stringify(lb.body)).toBe(200);
  for (const [what, url] of [
    ['back-fill error report', bf.body.import.errorReportUrl],
    ['late-label error report', lb.body.import.errorReportUrl],
  ] as const) {
    const report = await ds.agent.get(url).expect(200);
    exported.push({ source: what, text: report.text });
  }

  // The audit log as a supervisor exports it.
  const sup = await signIn('supervisor@demo.test');
  const audit = await sup.agent.get(`/api/audit/export.csv?from=${encodeURIComponent(startedAt)}`).expect(200);
  exported.push({ source: 'audit export', text: audit.text });

  // Everything asynchronous is done: scored, mailed, delivered to the upstream webhook.
  await waitFor(async () => (await readdir(stack.mailDir)).some((f) => f.endsWith('.json')), 30_000);
  await waitFor(async () => stack.webhooks.length > 0, 30_000);
  await waitFor(async () => {
    const [r] = await stack.db.sequelize.query<{ n: number }>("SELECT COUNT(*) AS n FROM transactions WHERE status = 'accepted' AND received_at >= ?", {
      replacements: [new Date(startedAt)],
      type: QueryTypes.SELECT,
    });
    return Number(r.n) === 0;
  }, 30_000);
}

// ─── the places scanned ───

/** Every character, binary and numeric column of every table, from information_schema; only cells holding a 12-digit run come back. */
async function databaseTexts(db: Database): Promise<{ source: string; text: string }[]> {
  const columns = await db.sequelize.query<{ t: string; c: string }>(
    `SELECT c.TABLE_NAME AS t, c.COLUMN_NAME AS c FROM information_schema.COLUMNS c
       JOIN information_schema.TABLES t ON t.TABLE_SCHEMA = c.TABLE_SCHEMA AND t.TABLE_NAME = c.TABLE_NAME AND t.TABLE_TYPE = 'BASE TABLE'
     WHERE c.TABLE_SCHEMA = DATABASE()
       AND c.DATA_TYPE IN ('char', 'varchar', 'tinytext', 'text', 'mediumtext', 'longtext', 'binary', 'varbinary', 'tinyblob', 'blob', 'mediumblob', 'longblob', 'json', 'enum', 'set', 'bigint', 'decimal')
     ORDER BY c.TABLE_NAME, c.COLUMN_NAME`,
    { type: QueryTypes.SELECT },
  );
  expect(columns.length).toBeGreaterThan(100);
  const out: { source: string; text: string }[] = [];
  for (const { t, c } of columns) {
    const rows = await db.sequelize.query<{ v: string | Buffer }>(`SELECT CAST(\`${c}\` AS CHAR) AS v FROM \`${t}\` WHERE CAST(\`${c}\` AS CHAR) REGEXP '[0-9]([ -]?[0-9]){11}'`, {
      type: QueryTypes.SELECT,
    });
    for (const r of rows) out.push({ source: `db ${t}.${c}`, text: Buffer.isBuffer(r.v) ? r.v.toString('latin1') : String(r.v) });
  }
  return out;
}

/** Every key of the Redis the processes share, and every value whatever its type (strings, hashes, lists, sets, sorted-set members, streams: BullMQ jobs included). */
async function redisTexts(): Promise<{ source: string; text: string }[]> {
  const redis = createRedis(loadConfig(stack.env), { name: 'pan-scan', forBullmq: true });
  const out: { source: string; text: string }[] = [];
  try {
    let cursor = '0';
    do {
      const [next, keys] = await redis.scan(cursor, 'COUNT', 500);
      cursor = next;
      for (const key of keys) {
        const type = await redis.type(key);
        const values: string[] =
          type === 'string'
            ? [(await redis.getBuffer(key))?.toString('latin1') ?? '']
            : type === 'hash'
              ? Object.entries(await redis.hgetall(key)).flat()
              : type === 'list'
                ? await redis.lrange(key, 0, -1)
                : type === 'set'
                  ? await redis.smembers(key)
                  : type === 'zset'
                    ? // Members only: scores are the numbers Redis orders by (BullMQ's delayed set scores a job by its time times 4096).
                      await redis.zrange(key, 0, -1)
                    : type === 'stream'
                      ? (await redis.xrange(key, '-', '+')).flat(3)
                      : [`(unread type ${type})`];
        out.push({ source: `redis ${type} ${key}`, text: [key, ...values].join('\n') });
      }
    } while (cursor !== '0');
  } finally {
    redis.disconnect();
  }
  return out;
}

/** Every file below a folder (caught mail as JSON and .eml; error reports in the upload folder). */
async function fileTexts(dir: string, label: string): Promise<{ source: string; text: string }[]> {
  const out: { source: string; text: string }[] = [];
  for (const e of await readdir(dir, { withFileTypes: true, recursive: true }).catch(() => [])) {
    if (!e.isFile()) continue;
    const full = path.join(e.parentPath, e.name);
    out.push({ source: `${label} ${path.relative(dir, full)}`, text: (await readFile(full)).toString('utf8') });
  }
  return out;
}

async function everything(): Promise<{ source: string; text: string }[]> {
  const logs = (await stack.logs()).map((l) => ({ source: `log ${l.file}`, text: l.text }));
  return [
    ...(await databaseTexts(stack.db)),
    ...(await redisTexts()),
    ...logs,
    ...(await fileTexts(stack.mailDir, 'mail')),
    ...(await fileTexts(path.join(stack.uploadDir, 'backfill'), 'upload folder')),
    ...(await fileTexts(path.join(stack.uploadDir, 'labels'), 'upload folder')),
    ...stack.webhooks.map((w, i) => ({ source: `webhook ${i + 1}`, text: `${JSON.stringify(w.headers)}\n${w.body}` })),
    ...exported,
  ];
}

describe('card-data scan', () => {
  it('reads every kind of place it scans: a planted number is found in a table, each Redis type, a log, a mail file and an export', async () => {
    const canary = testCard('411111');
    const canaryTable = `security_scan_canary_${Date.now()}`;
    const redis = createRedis(loadConfig(stack.env), { name: 'pan-canary', forBullmq: true });
    const prefix = `${stack.env.REDIS_PREFIX}:canary`;
    const { writeFile, rm } = await import('node:fs/promises');
    const canaryLog = path.join(stack.logsDir, 'canary.log');
    const canaryMail = path.join(stack.mailDir, 'canary.json');
    try {
      await stack.db.sequelize.query(`CREATE TABLE \`${canaryTable}\` (note TEXT)`, { type: QueryTypes.RAW });
      await stack.db.sequelize.query(`INSERT INTO \`${canaryTable}\` VALUES (?)`, { replacements: [`card ${spaced(canary)}`], type: QueryTypes.INSERT });
      await redis.set(`${prefix}:string`, canary);
      await redis.hset(`${prefix}:hash`, 'f', `{"card":"${canary}"}`);
      await redis.rpush(`${prefix}:list`, canary);
      await redis.sadd(`${prefix}:set`, canary);
      await redis.zadd(`${prefix}:zset`, 1, canary);
      await redis.xadd(`${prefix}:stream`, '*', 'f', canary);
      await writeFile(canaryLog, `{"msg":"${dashed(canary)}"}\n`);
      await writeFile(canaryMail, JSON.stringify({ text: canary }));
      exported.push({ source: 'canary export', text: canary });
      const found = new Set(scanAll(await everything()).filter((f) => f.digits === canary).map((f) => f.source.split(' ').slice(0, 2).join(' ')));
      for (const where of [`db ${canaryTable}.note`, 'redis string', 'redis hash', 'redis list', 'redis set', 'redis zset', 'redis stream', 'log canary.log', 'mail canary.json', 'canary export']) {
        expect([...found], where).toContain(where);
      }
    } finally {
      exported.length = 0;
      await stack.db.sequelize.query(`DROP TABLE IF EXISTS \`${canaryTable}\``, { type: QueryTypes.RAW });
      for (const t of ['string', 'hash', 'list', 'set', 'zset', 'stream']) await redis.del(`${prefix}:${t}`);
      redis.disconnect();
      await rm(canaryLog, { force: true });
      await rm(canaryMail, { force: true });
    }
  });

  it('finds no full card number in the database, Redis, the logs, the exports, the webhooks or the mail after every path received one', async () => {
    await drive();
    const findings: SourceFinding[] = scanAll(await everything());
    // Whatever is found is a leak; the ones we sent say which path leaked.
    const ours = new Set(ALL_CARDS);
    const named = findings.map((f) => ({ ...f, source: `${f.source}${ours.has(f.digits) ? '' : ' (not one of ours)'}` }));
    expect(describeFindings(named), 'full card numbers found').toBe('');
    // What staff typed is kept with each number masked to BIN and last four, the rest of the text as typed.
    const masked = (pan: string) => `${pan.slice(0, 6)}${'•'.repeat(pan.length - 10)}${pan.slice(-4)}`;
    const one = async (sql: string) => (await stack.db.sequelize.query<{ v: string }>(sql, { type: QueryTypes.SELECT }))[0]?.v ?? '';
    expect(await one('SELECT text AS v FROM case_notes ORDER BY id DESC LIMIT 1')).toBe(`Cardholder read the card out: ${maskPansInText(spaced(CARD.note))}, then hung up.`);
    expect(maskPansInText(spaced(CARD.note))).toBe(`${spaced(CARD.note).slice(0, 7)}•• •••• ${CARD.note.slice(-4)}`);
    expect(await one('SELECT subject AS v FROM case_messages ORDER BY id DESC LIMIT 1')).toBe(`Your card ${masked(CARD.mailSubject)}`);
    expect(await one('SELECT file_name AS v FROM case_evidence ORDER BY id DESC LIMIT 1')).toBe(`statement ${masked(CARD.evidenceName)}.pdf`);
    expect(stack.webhooks.map((w) => w.body).join('\n')).toContain(`card ${masked(CARD.reason)} reported stolen`);
    // The numbers did arrive: their BIN and last four are stored.
    const [{ n }] = await stack.db.sequelize.query<{ n: number }>('SELECT COUNT(*) AS n FROM cards WHERE last4 IN (:l)', { replacements: { l: ALL_CARDS.map((c) => c.slice(-4)) }, type: QueryTypes.SELECT });
    expect(Number(n)).toBeGreaterThanOrEqual(8);
  });
});
