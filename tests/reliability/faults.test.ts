/**
 * The fault suite: six faults, one after another, on one private stack
 * (MariaDB, Redis with its append-only file, the real web server, a worker
 * for scoring and the other queues, a training process), each under a
 * bounded load on 127.0.0.1 (a fixed rate for a fixed time). After each, the
 * accounting from the database: every transaction the API kept is stored
 * once and scored once, no alert or live push twice, no two open cases for a
 * card, nothing in the scoring queue's failed set, the listener's session
 * still signed in. The suite ends by printing one table, also written to
 * artifacts/reliability/faults.md and faults.json.
 *
 * HTTP semantics checked against RFC 9110: 202 Accepted (§15.3.3) only for
 * what is kept, 503 Service Unavailable (§15.6.4) with Retry-After (§10.2.3)
 * for what is not; 507 Insufficient Storage from RFC 4918 §11.5.
 */
import { execFileSync } from 'node:child_process';
import { createHash, randomBytes } from 'node:crypto';
import { closeSync, existsSync, mkdirSync, openSync, readdirSync, readFileSync, rmSync, writeFileSync, writeSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { deflateSync, crc32 } from 'node:zlib';
import { QueryTypes } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it, onTestFailed } from 'vitest';
import { stringify } from 'csv-stringify/sync';
import { BACKFILL_COLUMNS } from '../../shared/src/api/backfill';
import { reportPath } from '../../server/src/backfill/error-report';
import { labelReportRoot } from '../../server/src/labels/label-import-repository';
import { installChampion } from '../integration/helpers/champion';
import { seedLabelledHistory } from '../integration/helpers/labelled-history';
import {
  FAULT_COLUMNS,
  faultCells,
  faultTable,
  inventedPan,
  listenForAlerts,
  ROOT,
  runFaultScenario,
  runTag,
  signInSession,
  sleep,
  startStack,
  watchScoringQueue,
  type AlertListener,
  type FaultOutcome,
  type FaultRow,
  type FaultScenario,
  type Stack,
} from './harness';

const STACK_NAME = 'reliability-faults';
const DATA_DIR = path.join(ROOT, '.data', STACK_NAME);
const ARTIFACTS = path.join(ROOT, 'artifacts', 'reliability');
const PASSWORD = 'demo-password';
/**
 * Load of every fault: a fixed rate for a fixed time (so a bounded count), in requests of 20; the fault comes
 * a third of the way in. `npm run bench -- faults --soak` sets a longer load through the environment.
 */
const RATE = boundedNumber('FAULT_LOAD_RATE', 300, 50, 2_000);
const SECONDS = boundedNumber('FAULT_LOAD_SECONDS', 14, 8, 3_600);
const AT_SECOND = Math.max(3, Math.floor(SECONDS / 3));
/** Per fault: its load, up to 45 s of resends, the drain (up to 150 s when the requeue sweeper must step in) and the checks. */
const TEST_TIMEOUT_MS = (SECONDS + 240) * 1000;
/** Labelled history for the training runs (invented, seeded; fixture only), in a window of its own. */
const HISTORY = { from: new Date('2020-01-06T00:00:00.000Z'), to: new Date('2020-03-02T00:00:00.000Z'), rows: 30_000 };

function boundedNumber(name: string, fallback: number, min: number, max: number): number {
  const raw = process.env[name];
  const n = raw === undefined || raw === '' ? fallback : Number(raw);
  if (!Number.isInteger(n) || n < min || n > max) throw new Error(`${name}=${raw}: expected a whole number from ${min} to ${max}`);
  return n;
}

let stack: Stack;
let alerts: AlertListener;
let queue: ReturnType<typeof watchScoringQueue>;
let championId = 0;
const rows: FaultRow[] = [];
const suiteStarted = performance.now();

// ─── helpers ────────────────────────────────────────────────────────────────

// eslint-disable-next-line @typescript-eslint/no-explicit-any -- API answers of many shapes, each read field by field by the checks
type ApiAnswer = { status: number; body: any };

interface Staff {
  cookie: string;
  csrf: string;
  get(p: string): Promise<ApiAnswer>;
  post(p: string, body: unknown): Promise<ApiAnswer>;
}

/** A signed-in staff member of the demo issuer, talking to the API as the browser would (cookie and CSRF token). */
async function staff(email: string): Promise<Staff> {
  const { cookie, csrfToken } = await signInSession(stack.baseUrl, email, PASSWORD);
  const call = async (method: string, p: string, body?: unknown): Promise<ApiAnswer> => {
    const isForm = body instanceof FormData;
    const res = await fetch(`${stack.baseUrl}/api${p}`, {
      method,
      headers: { cookie, 'x-csrf-token': csrfToken, ...(body === undefined || isForm ? {} : { 'content-type': 'application/json' }) },
      body: body === undefined ? undefined : isForm ? body : JSON.stringify(body),
      signal: AbortSignal.timeout(60_000),
    });
    const text = await res.text();
    let parsed: unknown = text;
    try {
      parsed = JSON.parse(text);
    } catch {
      // not JSON: kept as text for the failure message
    }
    return { status: res.status, body: parsed };
  };
  return { cookie, csrf: csrfToken, get: (p) => call('GET', p), post: (p, body) => call('POST', p, body) };
}

async function sessionWorks(cookie: string): Promise<boolean> {
  const res = await fetch(`${stack.baseUrl}/api/auth/me`, { headers: { cookie }, signal: AbortSignal.timeout(10_000) });
  await res.arrayBuffer();
  return res.status === 200;
}

const q = <T extends object>(sql: string, replacements: unknown[] = []) => stack.db.sequelize.query<T>(sql, { replacements, type: QueryTypes.SELECT });

async function waitFor<T>(what: string, probe: () => Promise<T | null | undefined | false>, timeoutMs: number, everyMs = 100): Promise<T> {
  const until = performance.now() + timeoutMs;
  for (;;) {
    const v = await probe().catch(() => null);
    if (v) return v;
    if (performance.now() > until) throw new Error(`timed out after ${Math.round(timeoutMs / 1000)} s waiting for ${what}`);
    await sleep(everyMs);
  }
}

/**
 * What every fault must leave behind, whatever it was: nothing kept is lost
 * or unscored, nothing doubled, no HTTP answer but 202 and 503, everything
 * refused was resent and kept in the end, no scoring job given up, no process
 * crashed, and the listener's session still signed in.
 */
async function expectWhole(o: FaultOutcome, failedBefore: number): Promise<void> {
  const a = o.row.accounting;
  expect(stack.unexpectedExits()).toEqual([]);
  expect(o.row.drainSeconds, 'backlog scored within the drain time-out').not.toBeNull();
  expect(a.lostIds).toEqual([]);
  expect(a.lost).toBe(0);
  expect(a.unscoredInDb).toBe(0);
  expect(a.duplicateDetail).toEqual({ rows: 0, scores: 0, alerts: 0, pushes: 0, caseCounts: 0, openCases: 0 });
  // RFC 9110: a refusal the caller can retry is 503 (§15.6.4) saying when to retry (§10.2.3), in the project's
  // error shape; a 500 or 4xx here would be a defect.
  expect(a.httpFailures).toBe(0);
  expect(o.log.unavailableWithoutRetryAfter).toBe(0);
  expect(o.log.refusalsOutOfShape).toBe(0);
  expect(a.neverKept).toBe(0);
  expect(a.kept).toBe(o.load.sent);
  expect(a.scored).toBe(a.kept);
  expect(Object.keys(a.scoredBy)).toEqual([String(championId)]);
  const failed = await queue.failed();
  expect(failed.length - failedBefore, `scoring jobs given up: ${JSON.stringify(failed.slice(0, 5))}`).toBe(0);
  expect(await sessionWorks(alerts.cookie), 'the listener’s session survives').toBe(true);
}

/** One fault under this suite's load: RATE transactions/s for SECONDS, the fault at AT_SECOND, the listener counting pushes. */
function underLoad(fault: string, tag: string, inject: FaultScenario['inject'], more: Partial<FaultScenario> = {}): Promise<FaultOutcome> {
  return runFaultScenario(stack, { fault, tag, atSecond: AT_SECOND, ratePerSecond: RATE, seconds: SECONDS, alerts, inject, ...more });
}

/** Live alerts pushed for transactions the API kept after `since`: the path from worker to socket works again. */
function alertsAfter(o: FaultOutcome, since: number): number {
  return [...alerts.received.keys()].filter((id) => (o.log.keptAt.get(id) ?? 0) > since).length;
}

/** Keeps the row for the final table, marked when the test's own checks fail. */
function keep(row: FaultRow): FaultRow {
  rows.push(row);
  onTestFailed(() => void (row.notes = `CHECKS FAILED; ${row.notes ?? ''}`));
  return row;
}

function isMountPoint(dir: string): boolean {
  const target = path.resolve(dir);
  return readFileSync('/proc/mounts', 'utf8')
    .split('\n')
    .some((l) => l.split(' ')[1]?.replace(/\\040/g, ' ') === target);
}

function unmount(dir: string): void {
  if (!isMountPoint(dir)) return;
  try {
    execFileSync('umount', [dir], { stdio: 'pipe' });
  } catch {
    // Busy (a file still open): detach it now, the kernel frees it when the last user lets go.
    execFileSync('umount', ['-l', dir], { stdio: 'pipe' });
  }
}

/** A real PNG (RFC 2083) of random pixels, so it does not compress: about `side`² × 3 bytes. */
function randomPng(side: number): Buffer {
  const chunk = (type: string, data: Buffer) => {
    const len = Buffer.alloc(4);
    len.writeUInt32BE(data.length);
    const body = Buffer.concat([Buffer.from(type, 'ascii'), data]);
    const crc = Buffer.alloc(4);
    crc.writeUInt32BE(crc32(body) >>> 0);
    return Buffer.concat([len, body, crc]);
  };
  const ihdr = Buffer.alloc(13);
  ihdr.writeUInt32BE(side, 0);
  ihdr.writeUInt32BE(side, 4);
  ihdr.set([8, 2, 0, 0, 0], 8); // 8-bit RGB, deflate, no filter method, no interlace
  const raw = Buffer.concat(Array.from({ length: side }, () => Buffer.concat([Buffer.from([0]), randomBytes(side * 3)])));
  return Buffer.concat([Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]), chunk('IHDR', ihdr), chunk('IDAT', deflateSync(raw)), chunk('IEND', Buffer.alloc(0))]);
}

/** Files under `dir`, relative, recursively. */
function filesUnder(dir: string): string[] {
  if (!existsSync(dir)) return [];
  return readdirSync(dir, { recursive: true, withFileTypes: true })
    .filter((d) => d.isFile())
    .map((d) => path.relative(dir, path.join(d.parentPath, d.name)));
}

// ─── the stack ──────────────────────────────────────────────────────────────

beforeAll(async () => {
  // A run killed while the upload disk was mounted leaves the mount behind; the stack's wipe would trip on it.
  unmount(path.join(DATA_DIR, 'uploads'));
  stack = await startStack({
    name: STACK_NAME,
    dataDir: DATA_DIR,
    workers: 1,
    trainingProcess: true,
    redisAppendOnly: true,
    seed: async (db) => {
      championId = await installChampion(db);
      await seedLabelledHistory(db, { ...HISTORY, seed: 4242, prefix: 'fault-history' });
    },
  });
  alerts = await listenForAlerts(stack.baseUrl);
  queue = watchScoringQueue(stack);
});

afterAll(async () => {
  try {
    if (stack) unmount(stack.paths.uploads);
  } finally {
    report();
    await queue?.close();
    alerts?.close();
    await stack?.stop();
  }
});

function report(): void {
  if (rows.length === 0) return;
  const seconds = (performance.now() - suiteStarted) / 1000;
  const machine = `${os.cpus().length} × ${os.cpus()[0]?.model ?? 'CPU'}, Node ${process.version}`;
  const header = [
    `Fault suite (tests/reliability/faults.test.ts), ${new Date().toISOString()}, ${seconds.toFixed(0)} s on ${machine}.`,
    `Load per fault: ${RATE} transactions/s in requests of 20 for ${SECONDS} s on 127.0.0.1, the fault at second ${AT_SECOND} (the scoring-worker kill: 400/s in requests of 100); refused and failed requests resent after 1 s as an upstream would.`,
    'sent: distinct transaction ids; accepted: ids a 202 said are held (status accepted, or duplicate on a resend: stored by an attempt whose answer was lost);',
    '503: ids refused at least once with 503 (RFC 9110 §15.6.4); conn. errors: ids whose request failed at the client (connection refused or reset), never counted as accepted;',
    'other: any other HTTP answer (must be 0); scored: accepted ids with their score row; lost: accepted but missing or unscored at the end;',
    'duplicated: a second row, score, alert or live push for one id, two open cases for a card, or a case whose alert count differs from its alert rows;',
    'recovery s: from the fault (signal, stop, disk filled) until the first transaction accepted after the outage (after the last 503 or connection error, or after the fault when ingest never refused) had its score row; the training and disk faults define theirs in the notes;',
    'drain s: from the end of the load until every held transaction was scored.',
  ];
  const text = `${header.join('\n')}\n\n${faultTable(rows)}\n`;
  console.log(`\n${text}`);
  mkdirSync(ARTIFACTS, { recursive: true });
  const md = [
    '# Fault suite',
    '',
    ...header.map((l) => `${l}  `),
    '',
    `| ${FAULT_COLUMNS.join(' | ')} |`,
    `| ${FAULT_COLUMNS.map((_, i) => (i === 0 || i === FAULT_COLUMNS.length - 1 ? '---' : '---:')).join(' | ')} |`,
    ...rows.map((r) => `| ${faultCells(r).map((c) => String(c).replace(/\|/g, '\\|')).join(' | ')} |`),
    '',
  ].join('\n');
  writeFileSync(path.join(ARTIFACTS, 'faults.md'), md);
  writeFileSync(path.join(ARTIFACTS, 'faults.json'), `${JSON.stringify({ at: new Date().toISOString(), seconds, machine, rate: RATE, loadSeconds: SECONDS, rows }, null, 2)}\n`);
  console.log(`written: ${path.relative(ROOT, ARTIFACTS)}/faults.md, faults.json`);
}

// ─── the faults ─────────────────────────────────────────────────────────────

describe('faults under load', () => {
  it('fault 1: scoring worker SIGKILL mid-job: the job is taken over, everything accepted is scored once', async () => {
    const failedBefore = (await queue.failed()).length;
    const stalledBefore = queue.stalled();
    let activeAtKill = 0;
    const o = await underLoad(
      'scoring worker SIGKILL',
      runTag('f1'),
      async (mark) => {
        activeAtKill = await queue.untilActive(3_000);
        mark();
        await stack.kill('worker-0');
        await sleep(3_000);
        await stack.start('worker-0');
      },
      // Large requests: a job takes long enough that the kill lands in the middle of one.
      { ratePerSecond: 400, batchSize: 100 },
    );
    const stalled = queue.stalled() - stalledBefore;
    const pushedAfter = alertsAfter(o, o.faultEnd);
    const row = keep({ ...o.row, notes: `job active at the kill: ${activeAtKill}; stalled jobs taken over: ${stalled}; ${pushedAfter} alerts pushed after the restart` });
    const a = row.accounting;
    expect(activeAtKill).toBeGreaterThan(0);
    // Short scoring locks: the dead worker's job is taken over within seconds, not after a minute.
    expect(stalled).toBeGreaterThan(0);
    expect(row.drainSeconds!).toBeLessThan(45);
    // Ingest does not depend on the worker: everything is accepted at once, first time.
    expect(a.refused503).toBe(0);
    expect(a.connectionErrors).toBe(0);
    expect(a.accepted).toBe(o.load.sent);
    expect(row.recoverySeconds).not.toBeNull();
    expect(row.recoverySeconds!).toBeLessThan(30);
    expect(pushedAfter).toBeGreaterThan(0);
    await expectWhole(o, failedBefore);
  }, TEST_TIMEOUT_MS);

  it('fault 2: training process SIGKILL mid-run: the run ends failed with a reason, nothing half-registered, the champion keeps scoring, a new run completes', async () => {
    const failedBefore = (await queue.failed()).length;
    const scientist = await staff('scientist@demo.test');
    const tag = runTag('f2');
    const windowDays = Math.round((HISTORY.to.getTime() - HISTORY.from.getTime()) / 86_400_000);
    const versions = async () => (await q<{ id: number; label: string; role: string }>('SELECT id, label, role FROM model_versions ORDER BY id')).map((v) => ({ ...v, id: Number(v.id) }));
    const before = await versions();
    const killed = { runId: 0, phase: '', round: 0, failedAfter: 0, error: '' };
    const after = { runId: 0, seconds: 0, versionId: 0 };
    const o = await underLoad('training process SIGKILL', tag, async (mark) => {
      // Tiny shrinkage: every round still improves the validation loss, so early stopping never ends the
      // run before the kill, and 2,000 rounds last long enough to be caught in the middle.
      const started = await scientist.post('/training/runs', { to: HISTORY.to.toISOString(), windowDays, rounds: 2_000, shrinkage: 0.001, labelDelayDays: 30, label: `${tag}-killed` });
      expect(started.status, JSON.stringify(started.body)).toBe(202);
      killed.runId = started.body.run.id;
      // Boosting under way, so the boosting thread is busy when the process dies. The phase is saved as it
      // starts; the round only once a second, and on a quiet machine the 2,000 rounds can take less than
      // that, so waiting for a saved round could see the run completed instead.
      const running = await waitFor(
        'the run to be boosting',
        async () =>
          (await q<{ status: string; phase: string; round: number }>('SELECT status, phase, round FROM training_runs WHERE id = ?', [killed.runId])).find(
            (r) => r.status !== 'queued' && (r.status !== 'running' || r.phase === 'boosting'),
          ),
        90_000,
        25,
      );
      killed.phase = `${running.status} ${running.phase}`;
      killed.round = Number(running.round);
      mark();
      const killedAt = performance.now();
      await stack.kill('training');
      await sleep(1_000);
      await stack.start('training');
      // The run must not stay "running": the restarted process takes the dead run's job back and says what happened.
      const failed = await waitFor(
        'the killed run to be marked failed',
        async () => {
          const r = await scientist.get(`/training/runs/${killed.runId}`);
          return r.status === 200 && r.body.run.status !== 'running' && r.body.run.status !== 'queued' ? r.body.run : null;
        },
        90_000,
        250,
      );
      killed.failedAfter = (performance.now() - killedAt) / 1000;
      killed.error = failed.error ?? '';
      expect(failed.status).toBe('failed');
      // The stored row says so too (not only the page's reading of a silent run).
      expect((await q<{ status: string }>('SELECT status FROM training_runs WHERE id = ?', [killed.runId]))[0].status).toBe('failed');
      // After the restart a new run completes and is registered as the challenger.
      const t0 = performance.now();
      const again = await scientist.post('/training/runs', { to: HISTORY.to.toISOString(), windowDays, rounds: 25, labelDelayDays: 30, label: `${tag}-after` });
      expect(again.status, JSON.stringify(again.body)).toBe(202);
      after.runId = again.body.run.id;
      const done = await waitFor(
        'the new run to finish',
        async () => {
          const r = await scientist.get(`/training/runs/${after.runId}`);
          return r.status === 200 && ['completed', 'failed', 'cancelled'].includes(r.body.run.status) ? r.body.run : null;
        },
        120_000,
        250,
      );
      expect(done.status, JSON.stringify(done)).toBe('completed');
      after.seconds = (performance.now() - t0) / 1000;
      after.versionId = done.modelVersionId;
    });
    const row = keep({
      ...o.row,
      recoverySeconds: killed.failedAfter,
      notes:
        `recovery = kill to run ${killed.runId} shown failed (killed at round ${killed.round}): "${killed.error.split(';')[0]}"; ` +
        `no version from it; run ${after.runId} then completed in ${after.seconds.toFixed(1)} s as challenger; champion scored every transaction`,
    });
    const a = row.accounting;
    expect(killed.phase, 'killed while boosting').toBe('running boosting');
    expect(killed.error).toMatch(/training process/i);
    // Nothing of the killed run in the registry: exactly one new version, the later run's challenger; the champion unchanged.
    const now = await versions();
    expect(now.filter((v) => !before.some((b) => b.id === v.id)).map((v) => [v.id, v.label, v.role])).toEqual([[after.versionId, `${tag}-after`, 'challenger']]);
    expect(now.find((v) => v.role === 'champion')?.id).toBe(championId);
    // Ingest and scoring did not notice: no refusal, nothing failed at the client.
    expect(a.refused503).toBe(0);
    expect(a.connectionErrors).toBe(0);
    expect(a.accepted).toBe(o.load.sent);
    await expectWhole(o, failedBefore);
  }, TEST_TIMEOUT_MS);

  it('fault 3: web server SIGKILL mid-load: in-flight requests fail at the client, whatever got 202 is scored once, sessions and the live socket come back', async () => {
    const failedBefore = (await queue.failed()).length;
    const supervisor = await staff('supervisor@demo.test');
    expect(await sessionWorks(supervisor.cookie)).toBe(true);
    const hellosBefore = alerts.hellos.length;
    let killedAt = 0;
    let restartedAt = 0;
    const o = await underLoad('web server SIGKILL', runTag('f3'), async (mark) => {
      mark();
      killedAt = performance.now();
      await stack.kill('web');
      await sleep(1_000);
      await stack.start('web');
      restartedAt = performance.now();
    });
    const a = o.row.accounting;
    const signedInAgain = alerts.hellos.slice(hellosBefore)[0];
    // Alerts pushed for transactions kept after the restart: the socket is live again, not just connected.
    const pushedAfter = alertsAfter(o, restartedAt);
    const row = keep({
      ...o.row,
      notes:
        `web back ${((restartedAt - killedAt) / 1000).toFixed(1)} s after the kill; socket signed in again ${signedInAgain ? `${((signedInAgain - killedAt) / 1000).toFixed(1)} s after it` : 'never'}; ` +
        `${pushedAfter} alerts pushed after the restart; a session from before the kill still signed in`,
    });
    // The kill cut requests off: those failed at the client, and were resent.
    expect(a.connectionErrors).toBeGreaterThan(0);
    expect(alerts.hellos.length).toBeGreaterThan(hellosBefore);
    expect(pushedAfter).toBeGreaterThan(0);
    // Sessions live in MariaDB: a cookie from before the kill works with the new process.
    expect(await sessionWorks(supervisor.cookie)).toBe(true);
    expect(row.recoverySeconds).not.toBeNull();
    expect(row.recoverySeconds!).toBeLessThan(30);
    await expectWhole(o, failedBefore);
  }, TEST_TIMEOUT_MS);

  const restarts: { n: number; fault: string; restart: (s: Stack) => Promise<void>; maxRecoverySeconds: number; maxDrainSeconds: number }[] = [
    // A batch stored just as Redis went away is queued from the web process once Redis is back, not a sweep later.
    // Recovery: Redis replays its append-only file (under a second here) and the connections are ready within half a
    // second of that (server/src/lib/redis.ts); with ioredis's default loading re-check it took 8 s.
    { n: 4, fault: 'Redis restart', restart: (s) => s.redis.restart(), maxRecoverySeconds: 6, maxDrainSeconds: 45 },
    // A commit whose answer was lost with the connection may leave rows the requeue sweeper has to find (60-90 s).
    { n: 5, fault: 'MariaDB restart', restart: (s) => s.mariadb.restart(), maxRecoverySeconds: 15, maxDrainSeconds: 140 },
  ];
  it.each(restarts)('fault $n: $fault mid-load: 503 for what it cannot keep, never 202 for something lost; web and workers reconnect by themselves', async ({ fault, restart, maxRecoverySeconds, maxDrainSeconds }) => {
    const failedBefore = (await queue.failed()).length;
    const o = await underLoad(fault, runTag(fault.slice(0, 5).toLowerCase()), () => restart(stack));
    const pushedAfter = alertsAfter(o, o.faultEnd);
    const row = keep({ ...o.row, notes: `no app process restarted; ${(o.faultSeconds).toFixed(1)} s to restart; ${pushedAfter} alerts pushed after it` });
    const a = row.accounting;
    // The restart happened while the load ran: some requests were refused, and only with a 503.
    expect(a.refused503).toBeGreaterThan(0);
    expect(a.connectionErrors).toBe(0);
    // Web and worker reconnected by themselves: ingest, scoring and the live push all work again.
    expect(pushedAfter).toBeGreaterThan(0);
    expect(row.recoverySeconds).not.toBeNull();
    expect(row.recoverySeconds!).toBeLessThan(maxRecoverySeconds);
    expect(row.drainSeconds!).toBeLessThan(maxDrainSeconds);
    await expectWhole(o, failedBefore);
  }, TEST_TIMEOUT_MS);

  it('fault 6: upload disk full: evidence, back-fill and late-label uploads answer 507 and leave nothing behind; ingest goes on; the same uploads succeed once space is freed', async (ctx) => {
    const uploads = stack.paths.uploads;
    expect(stack.env.UPLOAD_DIR).toBe(uploads);
    try {
      execFileSync('mount', ['-t', 'tmpfs', '-o', 'size=2m,mode=0700', 'tmpfs', uploads], { stdio: 'pipe' });
    } catch (e) {
      const why = ((e as { stderr?: Buffer }).stderr?.toString() || (e as Error).message).trim();
      rows.push({ fault: 'upload disk full', accounting: emptyAccounting(), recoverySeconds: null, drainSeconds: null, notes: `NOT RUN: mount refused (${why})` });
      console.warn(`\nupload disk full: NOT RUN. A 2 MB tmpfs could not be mounted on ${uploads} (${why}); run the suite as root (CI does).\n`);
      ctx.skip();
      return;
    }
    try {
      await diskFull();
    } finally {
      unmount(uploads);
    }
  }, TEST_TIMEOUT_MS);
});

function emptyAccounting(): FaultRow['accounting'] {
  return {
    sent: 0, accepted: 0, kept: 0, refused503: 0, connectionErrors: 0, neverKept: 0, scored: 0, lost: 0, unscoredInDb: 0,
    duplicated: 0, httpFailures: 0, otherFailures: 0, scoredBy: {}, lostIds: [], duplicateDetail: {},
  };
}

async function diskFull(): Promise<void> {
  const uploads = stack.paths.uploads;
  const failedBefore = (await queue.failed()).length;
  const supervisor = await staff('supervisor@demo.test');
  const scientist = await staff('scientist@demo.test');
  const tag = runTag('f6');
  const filler = path.join(uploads, 'filler.bin');
  const png = randomPng(120);
  const pngSha = createHash('sha256').update(png).digest('hex');
  // Back-fill: 1,200 rows over three chunks of 500, two of them rejected (unknown currency), so the import writes its
  // error report while later chunks are still being stored.
  const BAD_ROWS = new Set([1, 700]);
  // Ids outside the load's prefix: these are history, never scored, and must not count in the load's accounting.
  const bfIds = Array.from({ length: 1_200 }, (_, i) => `bf-${tag}-${i}`);
  const bfRows = bfIds.map((id, i) => ({
    id,
    occurredAt: '2026-01-05T10:00:00Z',
    amount: `${10 + (i % 90)}.00`,
    currency: BAD_ROWS.has(i) ? 'XXQ' : 'USD',
    'card.number': inventedPan(900_000 + (i % 50)),
    'card.cardholderId': `ch-${tag}-${i % 50}`,
    'merchant.id': 'm-fault',
    'merchant.name': 'Invented Hardware',
    'merchant.mcc': '5251',
    'merchant.country': 'US',
    cardPresent: 'true',
  }));
  const backfillCsv = stringify(bfRows.map((r) => BACKFILL_COLUMNS.map((c) => (r as Record<string, string>)[c] ?? '')), { header: true, columns: [...BACKFILL_COLUMNS] });
  // Late labels: one for a stored transaction of the history, one for an id nobody has (rejected: the report again).
  const labelsCsv = `transactionId,reportedAt,fraudType\nfault-history-11,2020-03-01,card_not_present\nnobody-${tag},2020-03-01,counterfeit\n`;
  const form = (name: string, type: string, data: Buffer | string) => {
    const f = new FormData();
    f.append('file', new Blob([typeof data === 'string' ? data : new Uint8Array(data)], { type }), name);
    return f;
  };
  const uploadAll = async (caseId: number) => ({
    evidence: await supervisor.post(`/cases/${caseId}/evidence`, form('receipt.png', 'image/png', png)),
    backfill: await scientist.post('/backfill/transactions', form('history.csv', 'text/csv', backfillCsv)),
    labels: await scientist.post('/labels/imports', form('chargebacks.csv', 'text/csv', labelsCsv)),
  });
  const counts = async () => ({
    evidence: Number((await q<{ n: number }>('SELECT COUNT(*) AS n FROM case_evidence'))[0].n),
    backfill: await q<{ id: number; status: string; error_code: string | null; error_report_file: string | null }>('SELECT id, status, error_code, error_report_file FROM backfill_imports ORDER BY id'),
    labels: await q<{ id: number; status: string; error_code: string | null; error_report_file: string | null }>('SELECT id, status, error_code, error_report_file FROM label_imports ORDER BY id'),
  });
  const full = { bytes: 0, answers: '' };
  const freed = { recovery: 0 };
  const o = await underLoad('upload disk full', tag, async (mark) => {
    const caseId = await waitFor('an open case', async () => Number((await q<{ id: number }>("SELECT id FROM cases WHERE status <> 'closed' ORDER BY id LIMIT 1"))[0]?.id ?? 0), 30_000);
    const beforeCounts = await counts();
    // Fill the disk: write until the file system says no more (ENOSPC).
    mark();
    const fd = openSync(filler, 'w');
    const block = Buffer.alloc(64 * 1024, 1);
    try {
      for (;;) full.bytes += writeSync(fd, block);
    } catch (e) {
      if ((e as NodeJS.ErrnoException).code !== 'ENOSPC') throw e;
    } finally {
      closeSync(fd);
    }
    const onDisk = filesUnder(uploads).sort();
    const refused = await uploadAll(caseId);
    full.answers = `evidence ${refused.evidence.status}, back-fill ${refused.backfill.status}, labels ${refused.labels.status}`;
    // RFC 4918 §11.5: 507, the server cannot store what the request needs; in the project's error shape, with a message.
    for (const [what, r] of Object.entries(refused)) {
      expect(r.status, `${what} on a full disk: ${JSON.stringify(r.body)}`).toBe(507);
      expect(r.body.error.code, what).toBe('storage_full');
      expect(String(r.body.error.message).length, what).toBeGreaterThan(20);
    }
    // Nothing half-written stays on the disk, and no row points at a file.
    expect(filesUnder(uploads).sort()).toEqual(onDisk);
    const refusedCounts = await counts();
    expect(refusedCounts.evidence).toBe(beforeCounts.evidence);
    const newBackfill = refusedCounts.backfill.filter((r) => !beforeCounts.backfill.some((b) => b.id === r.id));
    const newLabels = refusedCounts.labels.filter((r) => !beforeCounts.labels.some((b) => b.id === r.id));
    expect(newBackfill.map((r) => [r.status, r.error_code, r.error_report_file])).toEqual([['failed', 'storage_full', null]]);
    expect(newLabels.map((r) => [r.status, r.error_code, r.error_report_file])).toEqual([['failed', 'storage_full', null]]);
    expect(stack.unexpectedExits()).toEqual([]);

    // Space freed: the very same uploads go through.
    rmSync(filler);
    const freedAt = performance.now();
    const ok = await uploadAll(caseId);
    freed.recovery = (performance.now() - freedAt) / 1000;
    expect(ok.evidence.status, JSON.stringify(ok.evidence.body)).toBe(201);
    expect(ok.backfill.status, JSON.stringify(ok.backfill.body)).toBe(200);
    expect(ok.labels.status, JSON.stringify(ok.labels.body)).toBe(200);
    expect(ok.backfill.body.import.counts.rejected).toBe(BAD_ROWS.size);
    // Rows kept by the refused attempt count as duplicates now; none is stored twice.
    expect(ok.backfill.body.import.counts.accepted + ok.backfill.body.import.counts.duplicate).toBe(bfIds.length - BAD_ROWS.size);
    expect(Number((await q<{ n: number }>('SELECT COUNT(*) AS n FROM transactions WHERE external_id IN (?)', [bfIds]))[0].n)).toBe(bfIds.length - BAD_ROWS.size);
    expect(ok.labels.body.import.counts.rejected).toBe(1);
    const [ev] = await q<{ storage_key: string; sha256: string }>('SELECT storage_key, sha256 FROM case_evidence WHERE id = ?', [ok.evidence.body.evidence.id]);
    expect(ev.sha256).toBe(pngSha);
    expect(createHash('sha256').update(readFileSync(path.join(uploads, ev.storage_key))).digest('hex')).toBe(pngSha);
    // Every stored file name of the upload folder's tables names a file that is there.
    const missing: string[] = [];
    for (const r of await q<{ storage_key: string }>('SELECT storage_key FROM case_evidence')) if (!existsSync(path.join(uploads, r.storage_key))) missing.push(r.storage_key);
    // Report names resolve as the download routes resolve them.
    for (const r of await q<{ f: string }>('SELECT error_report_file AS f FROM backfill_imports WHERE error_report_file IS NOT NULL')) if (!existsSync(reportPath(uploads, r.f) ?? '')) missing.push(`back-fill ${r.f}`);
    for (const r of await q<{ f: string }>('SELECT error_report_file AS f FROM label_imports WHERE error_report_file IS NOT NULL')) if (!existsSync(reportPath(labelReportRoot(uploads), r.f) ?? '')) missing.push(`labels ${r.f}`);
    expect(missing).toEqual([]);
    // And the reports of the successful imports are there to download.
    expect(ok.backfill.body.import.errorReportUrl).toBeTruthy();
    const report = await scientist.get(`/backfill/${ok.backfill.body.import.id}/errors.csv`);
    expect(report.status).toBe(200);
    expect(String(report.body)).toContain('currency');
  });
  const row = keep({
    ...o.row,
    recoverySeconds: freed.recovery,
    notes: `disk filled with ${(full.bytes / 1024).toFixed(0)} KiB; on it: ${full.answers}, nothing left on disk or in the tables; recovery = space freed to the same three uploads stored`,
  });
  const a = row.accounting;
  // The transaction path does not touch the upload disk.
  expect(a.refused503).toBe(0);
  expect(a.connectionErrors).toBe(0);
  expect(a.accepted).toBe(o.load.sent);
  await expectWhole(o, failedBefore);
}
