/**
 * Console benchmark: `npm run bench -- console [--cases 100000] [--transactions 1000000]
 *   [--requests 300] [--quick] [--skip-browser]`.
 *
 * Starts a private stack on its own ports (MariaDB 3948, Redis 6948, web 4948; data folder
 * .data/bench-console, wiped) with the real web server as a child process, fills the database
 * in SQL with invented rows (MariaDB's Sequence engine, seq_1_to_N): cards, cardholders,
 * investigators, transactions with scores and features (a realistic spread of probabilities,
 * amounts, MCCs, countries, channels), open and closed cases on their cards with alerts linking
 * transactions to them, then measures as a signed-in investigator:
 *   - the queue's first page (GET /api/cases) with the default sort, each sort key and a few
 *     filters: p50/p95 over `--requests` requests each (goal p95 < 100 ms);
 *   - the case file (GET /api/cases/:id) of random cases: p50/p95 (goal p95 < 150 ms);
 *   - in Debian's Chromium through Playwright, from the Sign in click to the first queue row
 *     visible (goal < 1 s), a few times;
 * and prints EXPLAIN of each queue query (the SQL the server's listQueue runs).
 * Figures, not a timed test: the machine's two cores are shared.
 */
import { existsSync, mkdirSync } from 'node:fs';
import path from 'node:path';
import { parseArgs } from 'node:util';
import { QueryTypes } from 'sequelize';
import { chromium } from '@playwright/test';
import { listQueue } from '../../server/src/cases/case-queries';
import { queueQuerySchema } from '../../shared/src/api/cases';
import type { Database } from '../../server/src/db/database';
import { installChampion } from '../integration/helpers/champion';
import { ROOT, signIn, startStack, table, type Stack } from '../reliability/harness';

const pct = (xs: number[], p: number) => {
  const s = [...xs].sort((a, b) => a - b);
  return s.length ? s[Math.min(s.length - 1, Math.max(0, Math.ceil((p / 100) * s.length) - 1))] : Number.NaN;
};

const MCCS = ['5411', '5812', '5999', '4829', '5732', '5944', '7995', '6011', '5311', '4111', '5541', '5967'];
const COUNTRIES = ['US', 'US', 'US', 'GB', 'DE', 'FR', 'CA', 'NL', 'MX', 'BR', 'NG', 'RO'];
const CHANNELS = ['pos', 'ecommerce', 'contactless', 'atm', 'moto'];
const STATUSES = ['new', 'new', 'new', 'claimed', 'claimed', 'waiting_cardholder', 'escalated', 'awaiting_approval'];
const sqlList = (xs: string[]) => xs.map((x) => `'${x}'`).join(', ');

async function sql(db: Database, text: string): Promise<void> {
  await db.sequelize.query(text, { type: QueryTypes.RAW });
}

/** Invented rows, in SQL: every table the queue and the case file read. */
async function generate(db: Database, o: { cases: number; closed: number; transactions: number; investigators: number; log: (l: string) => void }): Promise<void> {
  const t0 = Date.now();
  const cards = Math.max(o.cases + o.closed, Math.ceil(o.transactions / 5));
  const seq = (n: number) => `seq_1_to_${n}`;
  await sql(db, 'SET SESSION unique_checks = 0');
  // Investigators beside the demo accounts (same password hash as the demo investigator).
  await sql(
    db,
    `INSERT INTO users (email, display_name, role, status, password_hash, failed_login_count, created_at, updated_at)
     SELECT CONCAT('bench-investigator-', seq, '@demo.test'), CONCAT('Bench Investigator ', seq), 'investigator', 'active', u.password_hash, 0, UTC_TIMESTAMP(3), UTC_TIMESTAMP(3)
     FROM ${seq(o.investigators)} JOIN users u ON u.email = 'investigator@demo.test'`,
  );
  const staff = (await db.sequelize.query<{ id: number }>("SELECT id FROM users WHERE role IN ('investigator', 'supervisor') ORDER BY id", { type: QueryTypes.SELECT })).map((r) => Number(r.id));
  await sql(
    db,
    `INSERT INTO cards (pan_hash, bin, last4, cardholder_ref, status, created_at, updated_at)
     SELECT SHA2(CONCAT('bench-card-', seq), 256), ELT(1 + seq % 6, '990011', '990012', '990013', '990021', '990022', '990031'), LPAD((seq * 37) % 10000, 4, '0'),
            CONCAT('bch-', seq), IF(seq % 40 = 0, 'blocked', 'active'), UTC_TIMESTAMP(3), UTC_TIMESTAMP(3)
     FROM ${seq(cards)}`,
  );
  await sql(
    db,
    `INSERT INTO cardholders (ref, display_name, email, created_at, updated_at)
     SELECT CONCAT('bch-', seq), CONCAT('Cardholder ', seq), CONCAT('cardholder.', seq, '@cardholders.demo.test'), UTC_TIMESTAMP(3), UTC_TIMESTAMP(3) FROM ${seq(cards)}`,
  );
  o.log(`cards and cardholders: ${cards} (${((Date.now() - t0) / 1000).toFixed(0)} s)`);
  // Card c holds the transactions seq ≡ c (mod cards), spread over 60 days; amounts log-normal-ish.
  await sql(
    db,
    `INSERT INTO transactions (external_id, source, ingest_batch, api_key_id, card_id, occurred_at, received_at, amount_minor, currency, currency_exponent,
        merchant_ref, merchant_name, mcc, merchant_country, card_present, channel, device_id, ip, lat, lon, status)
     SELECT CONCAT('bc-', seq), 'api', 'bench-console-0000-0000-000000000000', NULL, 1 + seq % ${cards},
            UTC_TIMESTAMP(3) - INTERVAL (seq * 5) % 5184000 SECOND, UTC_TIMESTAMP(3) - INTERVAL (seq * 5) % 5184000 SECOND,
            GREATEST(100, FLOOR(EXP(3 + 4 * RAND(seq)) * 100)), ELT(1 + (seq % 20 = 0) + (seq % 50 = 0), 'USD', 'EUR', 'GBP'), 2,
            CONCAT('m-', seq % 900), CONCAT('Invented Merchant ', seq % 900), ELT(1 + seq % ${MCCS.length}, ${sqlList(MCCS)}),
            ELT(1 + (seq * 7) % ${COUNTRIES.length}, ${sqlList(COUNTRIES)}), seq % 3 <> 0, ELT(1 + seq % ${CHANNELS.length}, ${sqlList(CHANNELS)}),
            IF(seq % 3 = 0, CONCAT('dev-', seq % 50000), NULL), IF(seq % 3 = 0, CONCAT('198.51.100.', seq % 250), NULL),
            40 + (seq % 1000) / 100, CAST(seq % 2000 AS SIGNED) / 100 - 100, 'scored'
     FROM ${seq(o.transactions)}`,
  );
  o.log(`transactions: ${o.transactions} (${((Date.now() - t0) / 1000).toFixed(0)} s)`);
  const [{ model }] = await db.sequelize.query<{ model: number }>("SELECT id AS model FROM model_versions WHERE role = 'champion' LIMIT 1", { type: QueryTypes.SELECT });
  const caseCards = o.cases + o.closed;
  // Most transactions score low; those of case cards score high (they alerted).
  // RAND(seed) is a function of its seed, so the same expression gives the same probability each time it is written.
  const P = `IF(t.card_id <= ${caseCards}, 0.5 + 0.5 * RAND(t.id), 0.5 * POW(RAND(t.id), 6))`;
  await sql(
    db,
    `INSERT INTO transaction_scores (transaction_id, model_version_id, margin, normalized_margin, probability, reasons, alerted, threshold, scored_at, latency_ms)
     SELECT t.id, ${model}, ${P} * 4 - 2, ${P} * 2 - 1, ${P},
            '[{"feature":"amount","value":412.5,"contribution":0.41,"text":"amount 412.50 > 120.00: +0.41"},{"feature":"count_1h","value":4,"contribution":0.22,"text":"count_1h 4 > 2: +0.22"}]',
            ${P} >= 0.5, 0.5, t.received_at, 40 + t.id % 200
     FROM transactions t`,
  );
  o.log(`scores (${((Date.now() - t0) / 1000).toFixed(0)} s)`);
  await sql(
    db,
    `INSERT INTO transaction_features (transaction_id, features, computed_at)
     SELECT t.id, CONCAT('{"amount":', t.amount_minor / 100, ',"count_1h":', t.id % 5, ',"count_24h":', t.id % 17, ',"distance_km":', (t.id * 13) % 900, ',"speed_kmh":', (t.id * 7) % 300, ',"new_device":', t.id % 2, '}'), t.received_at
     FROM transactions t WHERE t.card_id <= ${caseCards} OR t.id % 5 = 0`,
  );
  o.log(`features (${((Date.now() - t0) / 1000).toFixed(0)} s)`);
  // One case per card: open ones on cards 1..cases, closed ones after them.
  await sql(
    db,
    `INSERT INTO cases (card_id, open_card_id, status, priority, assignee_id, highest_probability, highest_margin, amount_at_risk_minor, currency, currency_exponent,
        alert_count, first_alert_at, last_alert_at, sla_due_at, mcc, merchant_country, channel, disposition, closed_at, version, created_at, updated_at)
     SELECT seq, IF(seq <= ${o.cases}, seq, NULL), IF(seq <= ${o.cases}, ELT(1 + seq % ${STATUSES.length}, ${sqlList(STATUSES)}), 'closed'),
            ELT(1 + (seq % 10 = 0) + (seq % 4 = 0), 'standard', 'high', 'urgent'),
            ELT(1 + seq % ${staff.length}, ${staff.join(', ')}),
            0, 0, 0, 'USD', 2, 0, UTC_TIMESTAMP(3), UTC_TIMESTAMP(3), UTC_TIMESTAMP(3) + INTERVAL CAST(seq % 2000 AS SIGNED) - 400 MINUTE,
            ELT(1 + seq % ${MCCS.length}, ${sqlList(MCCS)}), ELT(1 + (seq * 7) % ${COUNTRIES.length}, ${sqlList(COUNTRIES)}), ELT(1 + seq % ${CHANNELS.length}, ${sqlList(CHANNELS)}),
            IF(seq > ${o.cases}, ELT(1 + seq % 3, 'confirmed_fraud', 'legitimate', 'inconclusive'), NULL), IF(seq > ${o.cases}, UTC_TIMESTAMP(3) - INTERVAL seq % 30 DAY, NULL),
            1, UTC_TIMESTAMP(3), UTC_TIMESTAMP(3)
     FROM ${seq(caseCards)}`,
  );
  // 'new' cases are unassigned two times in five; the others have someone.
  await sql(db, "UPDATE cases SET assignee_id = NULL WHERE status = 'new' AND id % 5 < 2");
  // Alerts: the first one to three transactions of each case's card.
  await sql(
    db,
    `INSERT INTO alerts (transaction_id, case_id, probability, created_at)
     SELECT t.id, c.id, s.probability, t.occurred_at
     FROM cases c JOIN transactions t ON t.card_id = c.card_id JOIN transaction_scores s ON s.transaction_id = t.id
     WHERE t.id <= c.card_id + ${cards} * (c.id % 3)`,
  );
  await sql(
    db,
    `UPDATE cases c JOIN (SELECT a.case_id, COUNT(*) AS n, MAX(a.probability) AS p, SUM(t.amount_minor) AS amount, MIN(t.occurred_at) AS first_at, MAX(t.occurred_at) AS last_at
                         FROM alerts a JOIN transactions t ON t.id = a.transaction_id GROUP BY a.case_id) x ON x.case_id = c.id
     SET c.alert_count = x.n, c.highest_probability = x.p, c.highest_margin = x.p * 2 - 1, c.amount_at_risk_minor = x.amount,
         c.first_alert_at = x.first_at, c.last_alert_at = x.last_at,
         -- A working queue: due times from 8 hours ago (breached) to 40 hours ahead, about one in six breached.
         c.sla_due_at = UTC_TIMESTAMP(3) + INTERVAL (CAST((c.id * 37) % 2880 AS SIGNED) - 480) MINUTE`,
  );
  await sql(db, 'SET SESSION unique_checks = 1');
  await sql(db, 'ANALYZE TABLE cases, alerts, transactions, transaction_scores, transaction_features, cards');
  const [n] = await db.sequelize.query<{ open: number; closed: number; alerts: number; tx: number }>(
    "SELECT SUM(status <> 'closed') AS open, SUM(status = 'closed') AS closed, (SELECT COUNT(*) FROM alerts) AS alerts, (SELECT COUNT(*) FROM transactions) AS tx FROM cases",
    { type: QueryTypes.SELECT },
  );
  o.log(`generated ${n.open} open and ${n.closed} closed cases, ${n.alerts} alerts, ${n.tx} transactions in ${((Date.now() - t0) / 1000).toFixed(0)} s`);
}

async function timedGets(stack: Stack, cookie: string, paths: string[]): Promise<number[]> {
  const out: number[] = [];
  for (const p of paths) {
    const t0 = performance.now();
    const res = await fetch(`${stack.baseUrl}${p}`, { headers: { cookie }, signal: AbortSignal.timeout(30_000) });
    await res.arrayBuffer();
    if (res.status !== 200) throw new Error(`GET ${p}: ${res.status}`);
    out.push(performance.now() - t0);
  }
  return out;
}

/** EXPLAIN of the SQL listQueue runs for a query (captured from Sequelize's logging). */
async function explainQueue(db: Database, query: Record<string, string>): Promise<string[]> {
  const captured: string[] = [];
  const options = (db.sequelize as unknown as { options: { logging?: unknown } }).options;
  const before = options.logging;
  options.logging = (s: string) => captured.push(s.replace(/^Executing \([^)]*\): /, ''));
  try {
    // As an investigator in no team: the queue with the team condition, as the timed investigator sees it.
    await listQueue(db, queueQuerySchema.parse(query), { userId: 1, anyTeam: false, teamIds: [] });
  } finally {
    options.logging = before;
  }
  const lines: string[] = [];
  for (const q of captured) {
    const rows = await db.sequelize.query<Record<string, unknown>>(`EXPLAIN ${q}`, { type: QueryTypes.SELECT });
    for (const r of rows) lines.push(`    ${String(r.table).padEnd(4)} ${String(r.type).padEnd(7)} key=${String(r.key)} rows=${String(r.rows)} ${String(r.Extra ?? '')}`);
  }
  return lines;
}

interface SignInTiming {
  /** Sign in click to the first queue row visible. */
  total: number;
  /** Of which: the sign-in request (password hash check) and the first page of the queue, as the browser saw them. */
  login: number;
  queue: number;
}

async function browserSignIn(stack: Stack, runs: number): Promise<SignInTiming[]> {
  const browser = await chromium.launch({
    executablePath: '/usr/bin/chromium',
    args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run'],
  });
  const out: SignInTiming[] = [];
  try {
    for (let i = 0; i < runs; i += 1) {
      const context = await browser.newContext();
      const page = await context.newPage();
      await page.goto(`${stack.baseUrl}/`, { waitUntil: 'networkidle' });
      await page.getByLabel('Email').fill('investigator@demo.test');
      await page.getByLabel('Password').fill('demo-password');
      const timing = (url: RegExp) =>
        page.waitForResponse((r) => url.test(r.url()), { timeout: 15_000 }).then(async (r) => {
          await r.finished();
          const t = r.request().timing();
          return t.responseEnd - t.requestStart;
        });
      const login = timing(/\/api\/auth\/login$/);
      const queue = timing(/\/api\/cases\?|\/api\/cases$/);
      const t0 = Date.now();
      await page.getByRole('button', { name: 'Sign in' }).click();
      await page.locator('tr[data-case-id]').first().waitFor({ state: 'visible', timeout: 15_000 });
      out.push({ total: Date.now() - t0, login: await login, queue: await queue });
      await context.close();
    }
  } finally {
    await browser.close();
  }
  return out;
}

export async function run(argv: string[]): Promise<void> {
  const { values } = parseArgs({
    args: argv,
    options: {
      cases: { type: 'string' },
      transactions: { type: 'string' },
      requests: { type: 'string' },
      quick: { type: 'boolean', default: false },
      'skip-browser': { type: 'boolean', default: false },
    },
  });
  const quick = values.quick ?? false;
  const cases = Number(values.cases ?? (quick ? 10_000 : 100_000));
  const transactions = Number(values.transactions ?? (quick ? 100_000 : 1_000_000));
  const requests = Number(values.requests ?? (quick ? 60 : 300));
  if (!existsSync(path.join(ROOT, 'dist', 'client', 'index.html')) && !values['skip-browser']) {
    throw new Error('dist/client is missing: run `npx vite build` first (or pass --skip-browser).');
  }
  const log = (l: string) => console.log(`[console bench] ${l}`);
  const tmpdir = path.join(ROOT, '.data', 'bench-console-mysqltmp');
  mkdirSync(tmpdir, { recursive: true });
  const stack = await startStack({
    name: 'bench-console',
    ports: { db: Number(process.env.BENCH_DB_PORT ?? 3948), redis: Number(process.env.BENCH_REDIS_PORT ?? 6948), web: Number(process.env.BENCH_PORT ?? 4948) },
    workers: 0,
    bufferPoolMb: 1024,
    // Its own temporary folder: other users of the machine clear /tmp.
    extraDbArgs: [`--tmpdir=${tmpdir}`],
    seed: async (db) => {
      await installChampion(db);
      await generate(db, { cases, closed: Math.round(cases / 5), transactions, investigators: 20, log });
    },
  });
  try {
    const cookie = await signIn(stack.baseUrl, 'investigator@demo.test', 'demo-password');
    const variants: [string, Record<string, string>][] = [
      ['default (priority desc)', {}],
      ...['probability', 'amount', 'age', 'slaDue', 'lastAlert', 'status', 'id'].map((k): [string, Record<string, string>] => [`sort=${k}`, { sort: k }]),
      ['sort=priority&order=asc', { sort: 'priority', order: 'asc' }],
      ['view=unassigned', { view: 'unassigned' }],
      ['view=mine', { view: 'mine' }],
      ['status=escalated', { status: 'escalated' }],
      ['priority=urgent&sort=slaDue', { priority: 'urgent', sort: 'slaDue', order: 'asc' }],
      ['mcc=7995,4829&sort=amount', { mcc: '7995,4829', sort: 'amount' }],
      ['country=NG&minProbability=0.9', { country: 'NG', minProbability: '0.9', sort: 'probability' }],
      ['channel=ecommerce&dueWithinMinutes=60', { channel: 'ecommerce', dueWithinMinutes: '60', sort: 'slaDue', order: 'asc' }],
      ['q=last four', { q: '0370' }],
      ['page=20', { page: '20' }],
    ];
    // Warm-up: the first requests after start fill the buffer pool.
    await timedGets(stack, cookie, variants.map(([, q]) => `/api/cases?${new URLSearchParams(q)}`));
    const rows: (string | number)[][] = [];
    const p95s: number[] = [];
    for (const [name, q] of variants) {
      const n = name.startsWith('default') ? requests : Math.max(20, Math.round(requests / 6));
      const t = await timedGets(stack, cookie, Array.from({ length: n }, () => `/api/cases?${new URLSearchParams(q)}`));
      p95s.push(pct(t, 95));
      rows.push([name, n, pct(t, 50).toFixed(1), pct(t, 95).toFixed(1), pct(t, 95) < 100 ? 'yes' : 'no']);
    }
    console.log(`\nQueue first page (GET /api/cases, 50 rows) over ${cases} open cases and ${transactions} transactions; goal p95 < 100 ms\n`);
    console.log(table(['query', 'requests', 'p50 ms', 'p95 ms', 'met'], rows));

    const [{ maxId }] = await stack.db.sequelize.query<{ maxId: number }>('SELECT MAX(id) AS maxId FROM cases', { type: QueryTypes.SELECT });
    const ids = Array.from({ length: requests }, (_, i) => 1 + ((i * 7_919 + 13) % Number(maxId)));
    const fileTimes = await timedGets(stack, cookie, ids.map((id) => `/api/cases/${id}`));

    let signIns: SignInTiming[] = [];
    if (!values['skip-browser']) signIns = await browserSignIn(stack, quick ? 3 : 5);
    const signInTimes = signIns.map((x) => x.total);
    if (signIns.length) {
      console.log(
        `\nsign-in runs (ms, click → first row / of which the login request / the queue request): ${signIns.map((x) => `${x.total}/${x.login.toFixed(0)}/${x.queue.toFixed(0)}`).join('  ')}`,
      );
    }

    console.log('\nEXPLAIN of the queue queries (rows = rows the plan expects to read):');
    for (const [name, q] of variants) {
      console.log(`  ${name}`);
      for (const l of await explainQueue(stack.db, q)) console.log(l);
    }

    console.log(`\nSummary (${cases} open cases, ${transactions} transactions)\n`);
    console.log(
      table(
        ['figure', 'measured', 'goal', 'ratio', 'met'],
        [
          ['queue first page p95, worst query', `${Math.max(...p95s).toFixed(1)} ms`, '< 100 ms', `${(Math.max(...p95s) / 100).toFixed(2)}×`, Math.max(...p95s) < 100 ? 'yes' : 'no'],
          ['queue first page p95, default sort', `${p95s[0].toFixed(1)} ms`, '< 100 ms', `${(p95s[0] / 100).toFixed(2)}×`, p95s[0] < 100 ? 'yes' : 'no'],
          ['case file p50', `${pct(fileTimes, 50).toFixed(1)} ms`, '', '', ''],
          ['case file p95', `${pct(fileTimes, 95).toFixed(1)} ms`, '< 150 ms', `${(pct(fileTimes, 95) / 150).toFixed(2)}×`, pct(fileTimes, 95) < 150 ? 'yes' : 'no'],
          ...(signInTimes.length
            ? [['sign-in click to first queue row, median', `${pct(signInTimes, 50).toFixed(0)} ms`, '< 1000 ms', `${(pct(signInTimes, 50) / 1000).toFixed(2)}×`, pct(signInTimes, 50) < 1000 ? 'yes' : 'no'],
               ['sign-in click to first queue row, worst', `${Math.max(...signInTimes).toFixed(0)} ms`, '< 1000 ms', `${(Math.max(...signInTimes) / 1000).toFixed(2)}×`, Math.max(...signInTimes) < 1000 ? 'yes' : 'no']]
            : []),
        ],
      ),
    );
  } finally {
    await stack.stop();
  }
}
