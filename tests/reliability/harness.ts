/**
 * Fault-test and load-benchmark harness: a private stack (MariaDB, Redis, the
 * real web server and worker entry points as child processes), a bounded load
 * generator on loopback that records every answer per transaction id, a
 * signed-in Socket.IO listener, and the final accounting from the database.
 *
 * Used by tests/reliability/*.test.ts and tests/bench/pipeline.ts. Every
 * address is 127.0.0.1; every request loop stops by itself (count and time).
 */
import { randomUUID } from 'node:crypto';
import { rmSync, writeFileSync } from 'node:fs';
import http from 'node:http';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { Queue, QueueEvents } from 'bullmq';
import { QueryTypes } from 'sequelize';
import { io as ioClient, type Socket } from 'socket.io-client';
import { spawnChild, describeExit, type ChildHandle } from '../../scripts/services/child';
import { startMariaDb, type MariaDbHandle } from '../../scripts/services/mariadb';
import { startRedis, type RedisHandle } from '../../scripts/services/redis';
import { appEnv, claimDataFolder, stackPaths, type Ports, type StackPaths } from '../../scripts/services/stack';
import { waitForHttp } from '../../scripts/services/wait';
import { tailFile } from '../../scripts/services/log';
import { loadConfig, type Config } from '../../server/src/config/index';
import { openDatabase, type Database } from '../../server/src/db/database';
import { createMigrator } from '../../server/src/db/migrator';
import { seedDemo } from '../../server/src/db/seed-demo';
import { DEMO_API_KEY } from '../../server/src/demo/demo-accounts';
import { createRedis } from '../../server/src/lib/redis';
import { luhnCheckDigit } from '../../shared/src/card/luhn';
import { QUEUES } from '../../shared/src/jobs/queues';
import { freePort } from '../integration/helpers/net';

export const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
export const WEB_SCRIPT = 'server/src/index.ts';
export const WORKER_SCRIPT = 'workers/src/index.ts';

export const sleep = (ms: number) => new Promise<void>((r) => setTimeout(r, ms));

// ─── stack ──────────────────────────────────────────────────────────────────

export interface StackOptions {
  /** Names the data folder (`.data/<name>` unless dataDir is given), logs and the Redis prefix. */
  name: string;
  dataDir?: string;
  /** Fixed ports; any left out are picked free on 127.0.0.1. */
  ports?: Partial<Pick<Ports, 'web' | 'db' | 'redis'>>;
  /** Worker processes: the first runs every queue (scoring, maintenance sweeper, mail...), the others scoring only. */
  workers?: number;
  /**
   * Training in a process of its own, named `training` (`--only=training`), with the first worker
   * serving every other queue, as `npm start` runs it. Off: the first worker trains as well.
   */
  trainingProcess?: boolean;
  /** Redis append-only file (default on: the fault tests restart Redis and expect its queue back). */
  redisAppendOnly?: boolean;
  /** MariaDB's test profile (redo log flushed once a second, no binlog). Default on. */
  fastDb?: boolean;
  bufferPoolMb?: number;
  extraDbArgs?: string[];
  /** Extra environment for every app child (e.g. SCORING_CONCURRENCY, DB_POOL_MAX). */
  env?: Record<string, string>;
  /** Node flags for the app children (e.g. --cpu-prof). */
  nodeArgs?: (role: 'web' | 'worker', index: number) => string[];
  /** How the first champion is made once the schema is in (the stack's own database connection is passed). */
  seed: (db: Database, c: Config, stack: { redisPort: number }) => Promise<void>;
  /** info or lower: readiness is read from the workers' "workers running" log line. */
  logLevel?: string;
  log?: (line: string) => void;
}

export interface AppProcess {
  name: string;
  role: 'web' | 'worker';
  args: string[];
  handle: ChildHandle;
}

export interface Stack {
  name: string;
  baseUrl: string;
  ports: Pick<Ports, 'web' | 'db' | 'redis' | 'smtp'>;
  paths: StackPaths;
  env: NodeJS.ProcessEnv;
  config: Config;
  mariadb: MariaDbHandle;
  redis: RedisHandle;
  /** The harness's own connection, for set-up and accounting. */
  db: Database;
  apiKey: string;
  /** The web server as it runs now (a new process after `start('web')`). */
  readonly web: AppProcess;
  workers: AppProcess[];
  /** The training process, with `trainingProcess`. */
  readonly training: AppProcess | undefined;
  /** SIGKILLs worker `i` (as a crash would) and resolves once it is gone. */
  killWorker(i: number): Promise<void>;
  /** Starts worker `i` again (after a kill); resolves once it is running. */
  startWorker(i: number): Promise<void>;
  /** SIGKILLs the app process of that name (`web`, `worker-0`, `training`) and resolves once it is gone. */
  kill(name: string): Promise<void>;
  /** Starts that app process again after a kill; resolves once it serves (web: health check 200; a worker: its "workers running" line). */
  start(name: string): Promise<void>;
  /** Processes that exited without being asked to (a crash). */
  unexpectedExits(): string[];
  stop(): Promise<void>;
}

function childEnvFor(o: StackOptions, paths: StackPaths, ports: Ports): NodeJS.ProcessEnv {
  const env: NodeJS.ProcessEnv = {
    ...process.env,
    ...appEnv({
      mode: 'test',
      paths,
      ports,
      root: ROOT,
      dbName: 'edgecase_stack',
      dbUser: 'edgecase',
      dbPassword: 'edgecase',
      redisPrefix: `ec-${o.name}`,
      logLevel: o.logLevel ?? 'info',
    }),
    ...o.env,
  };
  // Vitest's own markers must not reach the app children.
  delete env.VITEST;
  delete env.VITEST_POOL_ID;
  delete env.VITEST_WORKER_ID;
  delete env.NODE_OPTIONS;
  return env;
}

/**
 * Starts the whole stack on loopback: fresh data folder (wiped), MariaDB,
 * Redis, migrations, demo staff and API key, the caller's seed (a champion),
 * the web server and the workers, and waits for the health check.
 */
export async function startStack(o: StackOptions): Promise<Stack> {
  const log = o.log ?? ((l: string) => console.log(`[${o.name}] ${l}`));
  const paths = stackPaths(o.dataDir ?? path.join(ROOT, '.data', o.name));
  const release = await claimDataFolder(paths, { wipe: true, log });
  const ports: Ports = {
    web: o.ports?.web ?? (await freePort()),
    db: o.ports?.db ?? (await freePort()),
    redis: o.ports?.redis ?? (await freePort()),
    // No mail is sent in these runs; the port only has to be one nobody listens on.
    smtp: await freePort(),
  };
  const env = childEnvFor(o, paths, ports);
  const cleanups: (() => Promise<void>)[] = [];
  const cleanup = async () => {
    for (const c of cleanups.reverse()) await c().catch((e) => log(`clean-up: ${(e as Error).message}`));
    cleanups.length = 0;
    release();
  };
  try {
    const mariadb = await startMariaDb({
      dataDir: paths.mysql,
      runDir: paths.run,
      logDir: paths.logs,
      port: ports.db,
      databases: ['edgecase_stack'],
      user: 'edgecase',
      password: 'edgecase',
      fast: o.fastDb ?? true,
      bufferPoolMb: o.bufferPoolMb,
      extraArgs: o.extraDbArgs,
      log,
    });
    cleanups.push(() => mariadb.stop());
    const redis = await startRedis({
      dataDir: paths.redis,
      runDir: paths.run,
      logDir: paths.logs,
      port: ports.redis,
      appendOnly: o.redisAppendOnly ?? true,
      log,
    });
    cleanups.push(() => redis.stop());

    const config = loadConfig(env);
    const db = openDatabase(config);
    cleanups.push(() => db.close());
    await createMigrator(db.sequelize).up();
    await seedDemo(db, config);
    await o.seed(db, config, { redisPort: ports.redis });

    const expected = new Set<ChildHandle>();
    const exits: string[] = [];
    const spawnApp = (name: string, role: 'web' | 'worker', script: string, args: string[], index: number): AppProcess => {
      const abs = path.join(ROOT, script);
      const handle = spawnChild({
        name,
        command: process.execPath,
        args: [...(o.nodeArgs?.(role, index) ?? []), '--import', 'tsx', abs, ...args],
        cwd: ROOT,
        env: { ...env, EDGECASE_PROCESS: name },
        logFile: path.join(paths.logs, `${name}.log`),
        echo: 'none',
      });
      // Same pid-file convention as npm start/test, so a later run cleans up after a killed one.
      const pidFile = path.join(paths.run, `app-${name}.pid`);
      if (handle.pid !== undefined) writeFileSync(pidFile, `${handle.pid}\n${abs}\n`);
      void handle.exited.then((info) => {
        rmSync(pidFile, { force: true });
        if (!expected.has(handle)) exits.push(`${name} ${describeExit(info)}`);
      });
      return { name, role, args, handle };
    };
    const stopApp = async (p: AppProcess) => {
      expected.add(p.handle);
      await p.handle.stop(15_000);
    };

    // Every app process by name; a restarted one replaces its entry, so clean-up stops the one running now.
    const apps = new Map<string, AppProcess>();
    const add = (p: AppProcess) => void apps.set(p.name, p);
    add(spawnApp('web', 'web', WEB_SCRIPT, [], 0));
    const workerCount = o.workers ?? 1;
    // Queue names of workers/src/index.ts; with a training process the first worker serves all the others.
    const workerArgs = (i: number) => (i > 0 ? ['--only=scoring'] : o.trainingProcess ? ['--only=scoring,mail,outgoing,maintenance,drift'] : []);
    const workers: AppProcess[] = [];
    for (let i = 0; i < workerCount; i += 1) workers.push(spawnApp(`worker-${i}`, 'worker', WORKER_SCRIPT, workerArgs(i), i));
    workers.forEach(add);
    if (o.trainingProcess) add(spawnApp('training', 'worker', WORKER_SCRIPT, ['--only=training'], workerCount));
    cleanups.push(async () => {
      // Workers first, the web server last: the same order as a normal shutdown would take.
      for (const p of [...apps.values()].reverse()) await stopApp(p);
    });
    const baseUrl = `http://127.0.0.1:${ports.web}`;
    const appLog = (name: string) => path.join(paths.logs, `${name}.log`);
    const untilServing = async (p: AppProcess, mark: number) => {
      if (p.role === 'web') await waitForHttp(`${baseUrl}/api/health`, { timeoutMs: 120_000, failFast: () => exits[0] });
      else await waitForLogLine(appLog(p.name), 'workers running', 60_000, () => exits[0], mark + 1);
    };
    try {
      for (const p of apps.values()) await untilServing(p, 0);
    } catch (e) {
      for (const p of apps.values()) log(`last lines of ${p.name}.log:\n${await tailFile(appLog(p.name), 20)}`);
      throw e;
    }
    log(
      `stack up: web ${baseUrl}, MariaDB ${ports.db}, Redis ${ports.redis}, ${workerCount} worker process(es)` +
        `${o.trainingProcess ? ' and a training process' : ''}; logs in ${paths.logs}`,
    );

    const appNamed = (name: string) => {
      const p = apps.get(name);
      if (!p) throw new Error(`no app process named ${name} (there are ${[...apps.keys()].join(', ')})`);
      return p;
    };
    const kill = async (name: string) => {
      const p = appNamed(name);
      expected.add(p.handle);
      p.handle.signal('SIGKILL');
      await p.handle.exited;
    };
    const start = async (name: string) => {
      const old = appNamed(name);
      if (!old.handle.exitInfo) throw new Error(`${old.name} is still running`);
      const mark = old.role === 'web' ? 0 : await countLines(appLog(old.name), 'workers running');
      const script = old.role === 'web' ? WEB_SCRIPT : WORKER_SCRIPT;
      const index = old.role === 'web' ? 0 : name === 'training' ? workerCount : workers.findIndex((w) => w.name === name);
      const fresh = spawnApp(old.name, old.role, script, old.args, index);
      add(fresh);
      if (old.role === 'worker' && name !== 'training') workers[index] = fresh;
      await untilServing(fresh, mark);
    };

    return {
      name: o.name,
      baseUrl,
      ports,
      paths,
      env,
      config,
      mariadb,
      redis,
      db,
      apiKey: DEMO_API_KEY,
      get web() {
        return appNamed('web');
      },
      workers,
      get training() {
        return apps.get('training');
      },
      killWorker: (i) => kill(workers[i].name),
      startWorker: (i) => start(workers[i].name),
      kill,
      start,
      unexpectedExits: () => [...exits],
      stop: cleanup,
    };
  } catch (e) {
    await cleanup();
    throw e;
  }
}

async function countLines(file: string, needle: string): Promise<number> {
  const { readFile } = await import('node:fs/promises');
  const text = await readFile(file, 'utf8').catch(() => '');
  return text.split('\n').filter((l) => l.includes(needle)).length;
}

async function waitForLogLine(file: string, needle: string, timeoutMs: number, failFast: () => string | undefined, occurrences = 1): Promise<void> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    if ((await countLines(file, needle)) >= occurrences) return;
    const f = failFast();
    if (f) throw new Error(`gave up waiting for "${needle}" in ${path.basename(file)}: ${f}`);
    if (Date.now() > until) throw new Error(`timed out waiting for "${needle}" in ${path.basename(file)}`);
    await sleep(200);
  }
}

// ─── invented transactions ─────────────────────────────────────────────────

/** A Luhn-valid 16-digit number under 99 (ISO/IEC 7812 major industry identifier 9: national use); never printed. */
export function inventedPan(seed: number): string {
  const body = `990088${String(seed).padStart(9, '0')}`;
  return body + luhnCheckDigit(body);
}

export interface SimpleTxnOptions {
  /** Id prefix, unique per run. */
  tag: string;
  /** Distinct cards the load spreads over. */
  cards?: number;
  /** One transaction in `alertEvery` has a large amount (the fixture champion alerts on those). */
  alertEvery?: number;
}

/** Invented transactions with unique ids: mostly small grocery payments, every n-th a large one. */
export function simpleTransactions(o: SimpleTxnOptions): (n: number) => Record<string, unknown> & { id: string } {
  const cards = o.cards ?? 2_000;
  const alertEvery = o.alertEvery ?? 20;
  return (n) => {
    const card = (n * 7_919) % cards;
    return {
      id: `${o.tag}-${n}`,
      occurredAt: new Date().toISOString(),
      amount: n % alertEvery === 0 ? '2750.00' : `${10 + (n % 50)}.${String(n % 100).padStart(2, '0')}`,
      currency: 'USD',
      card: { number: inventedPan(card), cardholderId: `rel-ch-${card}` },
      merchant: { id: `m-${n % 40}`, name: `Invented Merchant ${n % 40}`, mcc: n % 3 === 0 ? '5812' : '5411', country: 'US' },
      cardPresent: n % 4 !== 0,
      channel: n % 4 === 0 ? 'ecommerce' : 'pos',
    };
  };
}

// ─── responses per id ───────────────────────────────────────────────────────

export type Answer = 'accepted' | 'duplicate' | 'rejected' | '503' | `http-${number}` | 'error';

export class ResponseLog {
  readonly byId = new Map<string, Answer[]>();
  readonly sentAt = new Map<string, number>();
  readonly http = new Map<string, number>();
  /** performance.now() of every 202 that accepted at least one transaction. */
  readonly acceptedTimes: number[] = [];
  /** performance.now() of every answer that was not a 202. */
  readonly refusedTimes: number[] = [];
  /** Milliseconds from send to answer, per request. */
  readonly requestLatencies: number[] = [];
  /** performance.now() at which each request of requestLatencies was sent (same order). */
  readonly requestSentAt: number[] = [];
  /** The handler's own time a decision reports (`latencyMs`), per answered decision. */
  readonly serverLatencies: number[] = [];
  /** performance.now() of the first answer that said the system holds the id (accepted, or duplicate on a resend). */
  readonly keptAt = new Map<string, number>();
  /** 503 answers without a Retry-After header (RFC 9110 §10.2.3 lets a 503 say when to come back; ours always do). */
  unavailableWithoutRetryAfter = 0;
  /** Refusals whose body is not the project's error shape `{ error: { code, message } }`. */
  refusalsOutOfShape = 0;

  record(id: string, a: Answer): void {
    if ((a === 'accepted' || a === 'duplicate') && !this.keptAt.has(id)) this.keptAt.set(id, performance.now());
    const list = this.byId.get(id);
    if (list) list.push(a);
    else this.byId.set(id, [a]);
  }

  countHttp(key: string): void {
    this.http.set(key, (this.http.get(key) ?? 0) + 1);
  }

  /** Ids the system said it holds (accepted, or a duplicate of something it stored). */
  kept(): string[] {
    return [...this.byId].filter(([, a]) => a.includes('accepted') || a.includes('duplicate')).map(([id]) => id);
  }

  accepted(): string[] {
    return [...this.byId].filter(([, a]) => a.includes('accepted')).map(([id]) => id);
  }

  /** Ids that got at least one 503. */
  refused(): string[] {
    return [...this.byId].filter(([, a]) => a.includes('503')).map(([id]) => id);
  }

  /** Ids whose every answer was a refusal or a failure: the caller never learnt they were kept. */
  neverKept(): string[] {
    return [...this.byId].filter(([, a]) => !a.includes('accepted') && !a.includes('duplicate')).map(([id]) => id);
  }
}

// ─── load generator ─────────────────────────────────────────────────────────

export interface LoadOptions {
  baseUrl: string;
  apiKey: string;
  /** `/api/v1/transactions` (default; batches of `batchSize`, a bare object when 1) or `/api/v1/decisions` (one each). */
  path?: string;
  /** Transactions per second offered (new ones; retries come on top). */
  ratePerSecond: number;
  batchSize: number;
  /** New transactions stop after this long. */
  seconds: number;
  /** And after this many. */
  maxTransactions?: number;
  make: (n: number) => Record<string, unknown> & { id: string };
  log: ResponseLog;
  /** Resend what was refused (503) or failed, as an upstream system would; bounded in attempts and time. */
  retry?: { afterMs: number; maxAttempts: number; untilMs: number };
  /** Requests in flight at most; a tick that finds them all busy waits. */
  maxInFlight?: number;
  requestTimeoutMs?: number;
  /** Called once per second with what was sent so far (fault injection hooks on it). */
  onSecond?: (second: number) => void | Promise<void>;
}

/** One POST on loopback; resolves with the status and body, rejects on a network error or after `timeoutMs`. */
function post(
  url: string,
  body: string,
  headers: Record<string, string>,
  timeoutMs: number,
  agent: http.Agent,
): Promise<{ status: number; text: string; retryAfter: string | undefined }> {
  return new Promise((resolve, reject) => {
    const req = http.request(url, { method: 'POST', headers: { ...headers, 'content-length': String(Buffer.byteLength(body)) }, agent, timeout: timeoutMs }, (res) => {
      const chunks: Buffer[] = [];
      res.on('data', (c: Buffer) => chunks.push(c));
      res.on('end', () => resolve({ status: res.statusCode ?? 0, text: Buffer.concat(chunks).toString('utf8'), retryAfter: res.headers['retry-after'] }));
      res.on('error', reject);
    });
    req.on('timeout', () => req.destroy(new Error(`no answer within ${timeoutMs} ms`)));
    req.on('error', reject);
    req.end(body);
  });
}

/** The project's one error shape: `{ error: { code, message } }`. */
function isErrorBody(text: string): boolean {
  try {
    const e = (JSON.parse(text) as { error?: { code?: unknown; message?: unknown } }).error;
    return typeof e?.code === 'string' && typeof e.message === 'string' && e.message.length > 0;
  } catch {
    return false;
  }
}

export interface LoadSummary {
  sent: number;
  requests: number;
  retries: number;
  seconds: number;
  /** Ids whose retries ran out while still refused. */
  givenUp: number;
}

/**
 * Sends invented transactions in batches at a steady rate to the ingest API
 * and records every answer per id. Stops on its own: after `seconds` (or
 * `maxTransactions`) for new transactions, then at `retry.untilMs` at the latest.
 */
export async function runLoad(o: LoadOptions): Promise<LoadSummary> {
  const started = performance.now();
  const interval = (o.batchSize / o.ratePerSecond) * 1000;
  const maxInFlight = o.maxInFlight ?? 32;
  const timeoutMs = o.requestTimeoutMs ?? 10_000;
  const url = `${o.baseUrl}${o.path ?? '/api/v1/transactions'}`;
  const decisions = (o.path ?? '').endsWith('/decisions');
  // node:http with kept-alive sockets: a fraction of fetch's CPU per request, so the generator leaves the cores to the stack.
  const agent = new http.Agent({ keepAlive: true, maxSockets: maxInFlight });
  let inFlight = 0;
  let n = 0;
  let requests = 0;
  let retries = 0;
  let givenUp = 0;
  const retryQueue: { items: (Record<string, unknown> & { id: string })[]; attempt: number; notBefore: number }[] = [];
  const pending = new Set<Promise<void>>();

  const send = (items: (Record<string, unknown> & { id: string })[], attempt: number) => {
    inFlight += 1;
    requests += 1;
    const body = o.batchSize === 1 ? items[0] : { transactions: items };
    const t0 = performance.now();
    for (const it of items) if (!o.log.sentAt.has(it.id)) o.log.sentAt.set(it.id, t0);
    const p = (async () => {
      let failed = false;
      try {
        const res = await post(url, JSON.stringify(body), { 'content-type': 'application/json', authorization: `Bearer ${o.apiKey}` }, timeoutMs, agent);
        const text = res.text;
        o.log.requestLatencies.push(performance.now() - t0);
        o.log.requestSentAt.push(t0);
        o.log.countHttp(String(res.status));
        if (decisions && res.status === 200) {
          const answer = JSON.parse(text) as { duplicate: boolean; latencyMs?: number };
          if (answer.latencyMs !== undefined) o.log.serverLatencies.push(answer.latencyMs);
          o.log.record(items[0].id, answer.duplicate ? 'duplicate' : 'accepted');
          o.log.acceptedTimes.push(performance.now());
        } else if (res.status === 202) {
          const results = (JSON.parse(text) as { results: { id: string | null; status: Answer }[] }).results;
          results.forEach((r, i) => o.log.record(items[i].id, r.status));
          if (results.some((r) => r.status === 'accepted')) o.log.acceptedTimes.push(performance.now());
        } else {
          o.log.refusedTimes.push(performance.now());
          if (res.status === 503 && !res.retryAfter) o.log.unavailableWithoutRetryAfter += 1;
          if (!isErrorBody(text)) o.log.refusalsOutOfShape += 1;
          const a: Answer = res.status === 503 ? '503' : `http-${res.status}`;
          for (const it of items) o.log.record(it.id, a);
          failed = res.status === 503 || res.status >= 500;
        }
      } catch {
        o.log.countHttp('error');
        o.log.refusedTimes.push(performance.now());
        for (const it of items) o.log.record(it.id, 'error');
        failed = true;
      } finally {
        inFlight -= 1;
      }
      if (failed && o.retry) {
        if (attempt + 1 < o.retry.maxAttempts) retryQueue.push({ items, attempt: attempt + 1, notBefore: performance.now() + o.retry.afterMs });
        else givenUp += items.length;
      }
    })();
    pending.add(p);
    void p.finally(() => pending.delete(p));
  };

  const newUntil = started + o.seconds * 1000;
  const hardUntil = started + Math.max(o.seconds * 1000, o.retry?.untilMs ?? 0);
  const max = o.maxTransactions ?? Number.POSITIVE_INFINITY;
  let nextTick = started;
  let second = 0;
  while (performance.now() < hardUntil) {
    const now = performance.now();
    if (now >= started + (second + 1) * 1000) {
      second += 1;
      await o.onSecond?.(second);
    }
    const wantsNew = now < newUntil && n < max;
    const dueRetries = retryQueue.filter((r) => r.notBefore <= now);
    if (!wantsNew && retryQueue.length === 0 && inFlight === 0) break;
    if (inFlight >= maxInFlight) {
      await sleep(2);
      continue;
    }
    if (dueRetries.length > 0) {
      const r = dueRetries[0];
      retryQueue.splice(retryQueue.indexOf(r), 1);
      retries += 1;
      send(r.items, r.attempt);
      continue;
    }
    if (wantsNew && now >= nextTick) {
      const count = Math.min(o.batchSize, max - n);
      const items = Array.from({ length: count }, () => o.make(n++));
      send(items, 0);
      nextTick += interval;
      // Never try to catch up more than a second of backlog at once.
      if (nextTick < now - 1000) nextTick = now;
      continue;
    }
    await sleep(Math.max(1, Math.min(10, nextTick - now)));
  }
  await Promise.allSettled([...pending]);
  agent.destroy();
  givenUp += retryQueue.reduce((s, r) => s + r.items.length, 0);
  return { sent: n, requests, retries, seconds: (performance.now() - started) / 1000, givenUp };
}

// ─── live alerts ────────────────────────────────────────────────────────────

export interface AlertListener {
  socket: Socket;
  /** performance.now() of each queue:alert, by externalId (a second one is a duplicate push). */
  received: Map<string, number[]>;
  /** The session cookie the socket signed in with. */
  cookie: string;
  /** performance.now() of each signed-in greeting (`hello`): one per connection, so a reconnection adds one. */
  hellos: number[];
  close(): void;
}

/** Signs in through the real routes (CSRF token, then login): the session cookie and the session's CSRF token. */
export async function signInSession(baseUrl: string, email: string, password: string): Promise<{ cookie: string; csrfToken: string }> {
  const csrfRes = await fetch(`${baseUrl}/api/auth/csrf`, { signal: AbortSignal.timeout(10_000) });
  const cookie0 = csrfRes.headers.getSetCookie().map((c) => c.split(';')[0]).join('; ');
  const { csrfToken } = (await csrfRes.json()) as { csrfToken: string };
  const login = await fetch(`${baseUrl}/api/auth/login`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', 'x-csrf-token': csrfToken, cookie: cookie0 },
    body: JSON.stringify({ email, password }),
    signal: AbortSignal.timeout(10_000),
  });
  if (login.status !== 200) throw new Error(`sign-in of ${email} failed: ${login.status} ${await login.text()}`);
  const body = (await login.json()) as { csrfToken: string };
  const fresh = login.headers.getSetCookie().map((c) => c.split(';')[0]);
  return { cookie: fresh.length > 0 ? fresh.join('; ') : cookie0, csrfToken: body.csrfToken };
}

/** Signs in through the real routes (CSRF token, then login) and returns the session cookie. */
export async function signIn(baseUrl: string, email: string, password: string): Promise<string> {
  return (await signInSession(baseUrl, email, password)).cookie;
}

/** A signed-in investigator's socket that keeps every queue:alert by the transaction's upstream id. */
export async function listenForAlerts(baseUrl: string, email = 'investigator@demo.test', password = 'demo-password'): Promise<AlertListener> {
  const cookie = await signIn(baseUrl, email, password);
  const socket = ioClient(baseUrl, { transports: ['websocket'], extraHeaders: { Cookie: cookie }, forceNew: true, reconnection: true, reconnectionDelay: 500 });
  const received = new Map<string, number[]>();
  const hellos: number[] = [];
  socket.on('hello', () => void hellos.push(performance.now()));
  socket.on('queue:alert', (e: { externalId?: string }) => {
    if (!e.externalId) return;
    const at = performance.now();
    const list = received.get(e.externalId);
    if (list) list.push(at);
    else received.set(e.externalId, [at]);
  });
  await new Promise<void>((resolve, reject) => {
    const t = setTimeout(() => reject(new Error('no socket hello within 15 s')), 15_000);
    socket.once('hello', () => {
      clearTimeout(t);
      resolve();
    });
    socket.once('connect_error', (err) => {
      clearTimeout(t);
      reject(err);
    });
  });
  return { socket, received, cookie, hellos, close: () => socket.close() };
}

// ─── accounting ─────────────────────────────────────────────────────────────

export interface Accounting {
  sent: number;
  /** Ids answered 202 with status accepted. */
  accepted: number;
  /** Ids the system said it holds: accepted, or duplicate on a resend (stored by an attempt whose answer was lost). */
  kept: number;
  /** Transactions that got at least one 503. */
  refused503: number;
  /** Transactions that got at least one connection error or time-out (counted as not accepted, and resent). */
  connectionErrors: number;
  /** Ids never answered accepted or duplicate (refused or failed every time). */
  neverKept: number;
  /** Kept ids that are scored. */
  scored: number;
  /** Kept ids missing from the database or still unscored at the end. */
  lost: number;
  /** Rows in the database that are not scored at the end (whatever their answer). */
  unscoredInDb: number;
  /** More than one row, score, alert or live push for one transaction, two open cases for a card, or a case counting an alert twice. */
  duplicated: number;
  /** HTTP answers other than 202 and 503 (a 500, a 400): ingest should never give those. */
  httpFailures: number;
  /** httpFailures plus connection errors and time-outs, per answer. */
  otherFailures: number;
  /** Kept ids scored, by the model version that scored them. */
  scoredBy: Record<string, number>;
  lostIds: string[];
  duplicateDetail: Record<string, number>;
}

/** One upstream id as the database holds it. */
export interface LedgerRow {
  externalId: string;
  rows: number;
  scored: number;
  scores: number;
  alerts: number;
  /** Epoch ms of the (first) score row, null when unscored. */
  scoredAt: number | null;
  modelVersionId: number | null;
}

interface DbRow {
  external_id: string;
  status: string;
  scores: number;
  scored_at: Date | string | null;
  model_version_id: number | null;
  alerts: number;
}

/** Per upstream id of a run, from the database: rows, scored rows, score rows (when and by which model) and alert rows. */
export async function readLedger(db: Database, tagPrefix: string): Promise<Map<string, LedgerRow>> {
  const rows = await db.sequelize.query<DbRow>(
    `SELECT t.external_id, t.status,
            (SELECT COUNT(*) FROM transaction_scores s WHERE s.transaction_id = t.id) AS scores,
            (SELECT MIN(s.scored_at) FROM transaction_scores s WHERE s.transaction_id = t.id) AS scored_at,
            (SELECT MIN(s.model_version_id) FROM transaction_scores s WHERE s.transaction_id = t.id) AS model_version_id,
            (SELECT COUNT(*) FROM alerts a WHERE a.transaction_id = t.id) AS alerts
     FROM transactions t WHERE t.external_id LIKE :p`,
    { replacements: { p: `${tagPrefix}%` }, type: QueryTypes.SELECT },
  );
  const out = new Map<string, LedgerRow>();
  for (const r of rows) {
    const scoredAt = r.scored_at === null ? null : new Date(r.scored_at).getTime();
    const prev = out.get(r.external_id);
    if (prev) {
      prev.rows += 1;
      prev.scored += r.status === 'scored' ? 1 : 0;
      prev.scores += Number(r.scores);
      prev.alerts += Number(r.alerts);
    } else {
      out.set(r.external_id, {
        externalId: r.external_id,
        rows: 1,
        scored: r.status === 'scored' ? 1 : 0,
        scores: Number(r.scores),
        alerts: Number(r.alerts),
        scoredAt,
        modelVersionId: r.model_version_id === null ? null : Number(r.model_version_id),
      });
    }
  }
  return out;
}

/** Waits (bounded) until every transaction of the run that is in the database is scored; returns seconds waited, or null on time-out. */
export async function waitUntilScored(db: Database, tagPrefix: string, expectedAtLeast: number, timeoutMs: number): Promise<number | null> {
  const t0 = performance.now();
  for (;;) {
    try {
      const [r] = await db.sequelize.query<{ total: number; scored: number }>(
        "SELECT COUNT(*) AS total, COALESCE(SUM(status = 'scored'), 0) AS scored FROM transactions WHERE external_id LIKE :p",
        { replacements: { p: `${tagPrefix}%` }, type: QueryTypes.SELECT },
      );
      if (Number(r.total) >= expectedAtLeast && Number(r.scored) === Number(r.total)) return (performance.now() - t0) / 1000;
    } catch {
      // The database may be coming back from a restart: ask again.
    }
    if (performance.now() - t0 > timeoutMs) return null;
    await sleep(250);
  }
}

/**
 * Every kept id in the database once and scored exactly once; no alert twice
 * for a transaction, no live push twice, no two open cases for one card, no
 * case whose alert count differs from its alert rows. Several of these are
 * also unique keys of the schema (one score and one alert per transaction,
 * one open case per card: migration 0002): counted here all the same, so a
 * schema change that dropped one would show.
 */
export async function account(db: Database, tagPrefix: string, log: ResponseLog, alerts?: AlertListener, ledger?: Map<string, LedgerRow>): Promise<Accounting> {
  const view = ledger ?? (await readLedger(db, tagPrefix));
  const kept = log.kept();
  const lostIds = kept.filter((id) => (view.get(id)?.scored ?? 0) < 1);
  const detail: Record<string, number> = { rows: 0, scores: 0, alerts: 0, pushes: 0, caseCounts: 0, openCases: 0 };
  for (const r of view.values()) {
    if (r.rows > 1) detail.rows += 1;
    if (r.scores > 1) detail.scores += 1;
    if (r.alerts > 1) detail.alerts += 1;
  }
  if (alerts) for (const times of alerts.received.values()) if (times.length > 1) detail.pushes += 1;
  // A case's alert_count must equal its alert rows: a retried job that counted an alert twice shows here.
  const [c] = await db.sequelize.query<{ n: number }>(
    `SELECT COUNT(*) AS n FROM cases c WHERE c.alert_count <> (SELECT COUNT(*) FROM alerts a WHERE a.case_id = c.id)`,
    { type: QueryTypes.SELECT },
  );
  detail.caseCounts = Number(c.n);
  const [o] = await db.sequelize.query<{ n: number }>(
    "SELECT COUNT(*) AS n FROM (SELECT card_id FROM cases WHERE status <> 'closed' GROUP BY card_id HAVING COUNT(*) > 1) twice",
    { type: QueryTypes.SELECT },
  );
  detail.openCases = Number(o.n);
  let httpFailures = 0;
  let errors = 0;
  for (const answers of log.byId.values()) {
    httpFailures += answers.filter((a) => a.startsWith('http-')).length;
    errors += answers.filter((a) => a === 'error').length;
  }
  const scoredBy: Record<string, number> = {};
  for (const id of kept) {
    const m = view.get(id)?.modelVersionId;
    if (m !== null && m !== undefined) scoredBy[m] = (scoredBy[m] ?? 0) + 1;
  }
  return {
    sent: log.byId.size,
    accepted: log.accepted().length,
    kept: kept.length,
    refused503: log.refused().length,
    connectionErrors: [...log.byId.values()].filter((a) => a.includes('error')).length,
    neverKept: log.neverKept().length,
    scored: kept.length - lostIds.length,
    lost: lostIds.length,
    unscoredInDb: [...view.values()].filter((r) => r.scored < 1).length,
    duplicated: Object.values(detail).reduce((s, v) => s + v, 0),
    httpFailures,
    otherFailures: httpFailures + errors,
    scoredBy,
    lostIds: lostIds.slice(0, 20),
    duplicateDetail: detail,
  };
}

/**
 * Recovery after a fault, in seconds from the fault itself: until the first
 * transaction kept after the outage (after the last 503 or connection error
 * that followed the fault, or after the fault when ingest never refused) has
 * its score row. So it covers both halves: ingest taking transactions again,
 * and scoring them. Null when none was kept and scored.
 */
export function recoveryAfter(log: ResponseLog, ledger: Map<string, LedgerRow>, faultAt: number): number | null {
  const outageEnd = Math.max(faultAt, ...log.refusedTimes.filter((t) => t >= faultAt));
  let first: { at: number; id: string } | null = null;
  for (const [id, at] of log.keptAt) if (at >= outageEnd && (first === null || at < first.at)) first = { at, id };
  const scoredAt = first ? ledger.get(first.id)?.scoredAt : null;
  if (!first || scoredAt === null || scoredAt === undefined) return null;
  return Math.max(0, (scoredAt - (performance.timeOrigin + faultAt)) / 1000);
}

/** A small fixed-width table: the first column (and any in `leftAligned`) to the left, the others to the right. */
export function table(headers: string[], rows: (string | number)[][], leftAligned: number[] = []): string {
  const cells = [headers, ...rows.map((r) => r.map(String))];
  const widths = headers.map((_, i) => Math.max(...cells.map((r) => r[i].length)));
  const line = (r: string[]) => r.map((c, i) => (i === 0 || leftAligned.includes(i) ? c.padEnd(widths[i]) : c.padStart(widths[i]))).join('  ').trimEnd();
  return [line(cells[0]), widths.map((w) => '-'.repeat(w)).join('  '), ...cells.slice(1).map(line)].join('\n');
}

export interface FaultRow {
  fault: string;
  accounting: Accounting;
  /** Seconds from the fault to recovery (see recoveryAfter; a fault may define its own, said in `notes`). */
  recoverySeconds: number | null;
  /** Seconds from the end of the load until everything kept was scored. */
  drainSeconds: number | null;
  /** What else the fault showed (its own checks), one short line. */
  notes?: string;
}

export const FAULT_COLUMNS = ['fault', 'sent', 'accepted', '503', 'conn. errors', 'other', 'scored', 'lost', 'duplicated', 'recovery s', 'drain s', 'notes'];

export function faultCells(r: FaultRow): (string | number)[] {
  const a = r.accounting;
  return [
    r.fault,
    a.sent,
    a.kept,
    a.refused503,
    a.connectionErrors,
    a.httpFailures,
    a.scored,
    a.lost,
    a.duplicated,
    r.recoverySeconds === null ? 'never' : r.recoverySeconds.toFixed(1),
    r.drainSeconds === null ? 'timed out' : r.drainSeconds.toFixed(1),
    r.notes ?? '',
  ];
}

export function faultTable(rows: FaultRow[]): string {
  return table(FAULT_COLUMNS, rows.map(faultCells), [FAULT_COLUMNS.length - 1]);
}

// ─── one fault under load ───────────────────────────────────────────────────

export interface FaultScenario {
  fault: string;
  /** Id prefix of this run's transactions. */
  tag: string;
  /** Second of the load at which `inject` starts (it runs beside the load, which goes on). */
  atSecond: number;
  /**
   * Causes the fault and resolves once the service is back (restarted, reconnected...). Calls
   * `mark()` at the moment of the fault itself (the kill, the stop) when that is not its start.
   */
  inject: (mark: () => void) => Promise<void>;
  ratePerSecond?: number;
  batchSize?: number;
  seconds?: number;
  alerts?: AlertListener;
  drainTimeoutMs?: number;
}

export interface FaultOutcome {
  row: FaultRow;
  log: ResponseLog;
  load: LoadSummary;
  ledger: Map<string, LedgerRow>;
  /** Seconds the fault lasted (the fault itself to the end of `inject`). */
  faultSeconds: number;
  /** performance.now() of the fault itself and of the end of `inject`. */
  faultAt: number;
  faultEnd: number;
}

/**
 * Runs a bounded load (a fixed rate for a fixed time, so a bounded count),
 * injects one fault in the middle of it, resends what was refused or failed
 * (as an upstream would), waits for the backlog to be scored and does the
 * accounting. Prints the one-row fault table.
 */
export async function runFaultScenario(stack: Stack, s: FaultScenario): Promise<FaultOutcome> {
  const log = new ResponseLog();
  const seconds = s.seconds ?? 16;
  const rate = s.ratePerSecond ?? 400;
  let faultStart = 0;
  let faultAt = 0;
  let faultEnd = 0;
  let injected: Promise<void> | undefined;
  const load = await runLoad({
    baseUrl: stack.baseUrl,
    apiKey: stack.apiKey,
    ratePerSecond: rate,
    batchSize: s.batchSize ?? 20,
    seconds,
    maxTransactions: rate * seconds,
    make: simpleTransactions({ tag: s.tag }),
    log,
    retry: { afterMs: 1_000, maxAttempts: 10, untilMs: seconds * 1000 + 45_000 },
    onSecond: (sec) => {
      if (sec !== s.atSecond) return;
      faultStart = performance.now();
      injected = s.inject(() => void (faultAt ||= performance.now())).then(() => void (faultEnd = performance.now()));
      // Awaited once the load is over; until then a failing check in it must not count as unhandled.
      injected.catch(() => undefined);
    },
  });
  await injected;
  if (faultStart === 0) throw new Error(`the load ended before second ${s.atSecond}: the fault was never injected`);
  faultAt ||= faultStart;
  const drainSeconds = await waitUntilScored(stack.db, s.tag, log.kept().length, s.drainTimeoutMs ?? 150_000);
  // Late pushes of the last alerts.
  await sleep(1_000);
  const ledger = await readLedger(stack.db, s.tag);
  const accounting = await account(stack.db, s.tag, log, s.alerts, ledger);
  const row: FaultRow = { fault: s.fault, accounting, recoverySeconds: recoveryAfter(log, ledger, faultAt), drainSeconds };
  console.log(`\n${faultTable([row])}`);
  console.log(
    `load: ${load.sent} transactions in ${load.requests} requests (${load.retries} resent), ${load.seconds.toFixed(1)} s; ` +
      `fault lasted ${((faultEnd - faultAt) / 1000).toFixed(1)} s; answers ${JSON.stringify(Object.fromEntries(log.http))}; ` +
      `alerts pushed ${s.alerts?.received.size ?? 'n/a'}; scored by ${JSON.stringify(accounting.scoredBy)}; duplicates ${JSON.stringify(accounting.duplicateDetail)}\n`,
  );
  return { row, log, load, ledger, faultSeconds: (faultEnd - faultAt) / 1000, faultAt, faultEnd };
}

/** The scoring queue seen from outside: job counts, failed jobs, and a wait for a job in progress. */
export function watchScoringQueue(stack: Stack) {
  const connection = createRedis(stack.config, { forBullmq: true, name: 'harness' });
  connection.on('error', () => undefined);
  const q = new Queue(QUEUES.scoring, { connection, prefix: stack.config.REDIS_PREFIX });
  const eventsConnection = createRedis(stack.config, { forBullmq: true, name: 'harness-events' });
  eventsConnection.on('error', () => undefined);
  const events = new QueueEvents(QUEUES.scoring, { connection: eventsConnection, prefix: stack.config.REDIS_PREFIX });
  events.on('error', () => undefined);
  let stalled = 0;
  events.on('stalled', () => void (stalled += 1));
  return {
    counts: () => q.getJobCounts('waiting', 'active', 'delayed', 'failed', 'completed'),
    /** Jobs found stalled (their worker died holding them) and put back in the queue. */
    stalled: () => stalled,
    /** Jobs in the failed set (attempts used up, or refused as unrecoverable), with why. */
    async failed(): Promise<{ id: string; reason: string }[]> {
      const jobs = await q.getFailed(0, 99);
      return jobs.map((j) => ({ id: String(j.id), reason: j.failedReason }));
    },
    /** Resolves with the active count once a job is being processed (or 0 after `timeoutMs`). */
    async untilActive(timeoutMs: number): Promise<number> {
      const until = performance.now() + timeoutMs;
      while (performance.now() < until) {
        const n = await q.getActiveCount();
        if (n > 0) return n;
        await sleep(5);
      }
      return 0;
    },
    async close() {
      await events.close();
      await q.close();
      connection.disconnect();
      eventsConnection.disconnect();
    },
  };
}

/** A tag unique to this run, for transaction ids. */
export const runTag = (what: string) => `${what}-${randomUUID().slice(0, 8)}`;

/** Seconds from `since` (performance.now()) to the first accepted answer after it. */
export function firstAcceptedAfter(log: ResponseLog, since: number): number | null {
  const t = log.acceptedTimes.filter((x) => x >= since).sort((a, b) => a - b)[0];
  return t === undefined ? null : (t - since) / 1000;
}
