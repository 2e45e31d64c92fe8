/**
 * Transaction pipeline benchmark: `npm run bench -- pipeline [--seconds 20] [--quick] [--runs 1]
 *   [--connections 4] [--batch 500] [--single-connections 16] [--alert-rate 1000] [--alert-batch 10]
 *   [--decision-rate 500] [--workers 2] [--durable-db] [--profile]
 *   [--only batch,single,alerts,decisions]`.
 *
 * Starts a private stack on bench ports (MariaDB 3947, Redis 6947 with its append-only file, web
 * 4947; data folder .data/bench, wiped), migrates, seeds the demo staff and API key and a small
 * invented history (500 cardholders × 40 days, labels known up to 10 days ago) with the first champion trained on it, starts the
 * real web server and two worker processes (the entry points, as child processes), then on loopback:
 *   batch     autocannon, `--connections` connections, `--batch` transactions per request, `--seconds`:
 *             accepted/s from the answers; scored/s from the database over the same window until
 *             the queue has drained;
 *   single    autocannon, one transaction per request: requests/s;
 *   alerts    an evenly paced load at `--alert-rate` transactions/s in requests of `--alert-batch`,
 *             with a share of large amounts; a signed-in Socket.IO client matches queue:alert to send
 *             times by externalId (ingest → alert), and transaction_scores.latency_ms gives ingest → scored;
 *   decisions an evenly paced load of POST /api/v1/decisions at `--decision-rate`/s: latency per request;
 * and from the database: every accepted id scored exactly once, at most one alert per transaction.
 * Each phase also prints the CPU seconds each process used (from /proc) and what the rest of the
 * machine took meanwhile, and the time the host stole from this virtual machine's cores, so a figure
 * measured beside someone else's load (on this machine or on the host) can be told apart.
 * `--profile` writes CPU profiles of the web server and workers to .data/bench-profiles; statements
 * slower than 50 ms are in .data/bench/logs/mariadb-slow.log.
 * autocannon's own rate limit sends each second's requests in one burst, so the two paced phases use
 * a sender of their own that spreads requests evenly (tests/reliability/harness.ts).
 *
 * Figures, not a timed test: every service shares the machine's two cores with the load generator
 * (and with whatever else runs on it); run a few times (`--runs 3`) and read the medians.
 */
import path from 'node:path';
import { mkdirSync, readFileSync } from 'node:fs';
import { parseArgs } from 'node:util';
import autocannon from 'autocannon';
import { QueryTypes } from 'sequelize';
import { createRedis } from '../../server/src/lib/redis';
import { publishEvents } from '../../server/src/events/event-bus';
import { readAlertingSettings, writeAlertingSettings } from '../../server/src/settings/settings-repository';
import { seedDemoHistory, DEMO_WORLD_SEED } from '../../server/src/demo/seed-history';
import { createDemoWorld, toIngestPayload, type SimulatedTransaction } from '../../server/src/demo/simulator/index';
import {
  account,
  listenForAlerts,
  ResponseLog,
  ROOT,
  runLoad,
  sleep,
  startStack,
  table,
  waitUntilScored,
  type AlertListener,
  type Stack,
} from '../reliability/harness';

type Payload = Record<string, unknown> & { id: string };

/** CPU seconds (user + system) a process has used so far, from /proc (Linux; clock ticks of 1/100 s). */
function cpuSeconds(pid: number | undefined): number {
  if (pid === undefined) return Number.NaN;
  try {
    const stat = readFileSync(`/proc/${pid}/stat`, 'utf8');
    const f = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
    return (Number(f[11]) + Number(f[12])) / 100;
  } catch {
    return Number.NaN;
  }
}

/** Where the CPU went during a phase: each process of the stack and this one, and the whole machine. */
function cpuMeter(stack: Stack) {
  const procs = (): [string, number | undefined][] => [
    ['mariadb', stack.mariadb.pid],
    ['redis', stack.redis.pid],
    ['web', stack.web.handle.pid],
    ...stack.workers.map((w): [string, number | undefined] => [w.name, w.handle.pid]),
    ['load generator', process.pid],
  ];
  const machine = () => {
    const [, ...t] = readFileSync('/proc/stat', 'utf8').split('\n')[0].trim().split(/\s+/).map(Number);
    // user nice system irq softirq; steal (t[7]) is time the host gave this virtual machine's cores to someone else.
    return { busy: (t[0] + t[1] + t[2] + t[5] + t[6]) / 100, steal: t[7] / 100, all: t.slice(0, 8).reduce((a, b) => a + b, 0) / 100 };
  };
  const before = new Map(procs().map(([n, pid]) => [n, cpuSeconds(pid)]));
  const m0 = machine();
  const t0 = performance.now();
  return () => {
    const wall = (performance.now() - t0) / 1000;
    const m1 = machine();
    const parts = procs().map(([n, pid]) => `${n} ${(cpuSeconds(pid) - (before.get(n) ?? 0)).toFixed(1)}`);
    const ours = procs().reduce((sum, [n, pid]) => sum + (cpuSeconds(pid) - (before.get(n) ?? 0)), 0);
    const busy = m1.busy - m0.busy;
    return `CPU s over ${wall.toFixed(1)} s: ${parts.join(', ')}; machine busy ${busy.toFixed(1)} of ${(m1.all - m0.all).toFixed(1)} (others ${(busy - ours).toFixed(1)}, stolen by the host ${(m1.steal - m0.steal).toFixed(1)})`;
  };
}

interface Flags {
  seconds: number;
  runs: number;
  connections: number;
  batch: number;
  singleConnections: number;
  alertRate: number;
  alertBatch: number;
  decisionRate: number;
  workers: number;
  durableDb: boolean;
  profile: boolean;
  /** The phases to run (`--only decisions`, `--only batch,single`): all by default. */
  phases: Set<Phase>;
  cardholders: number;
  days: number;
}

const PHASES = ['batch', 'single', 'alerts', 'decisions'] as const;
type Phase = (typeof PHASES)[number];

/** `--only a,b`: the named phases, all when not given; a name that is not a phase is a usage error. */
function phasesOf(only: string | undefined): Set<Phase> {
  if (only === undefined) return new Set(PHASES);
  const names = only.split(',').map((x) => x.trim()).filter((x) => x !== '');
  const unknown = names.filter((x) => !PHASES.includes(x as Phase));
  if (unknown.length > 0 || names.length === 0) throw new Error(`--only takes one or more of ${PHASES.join(', ')} (got "${only}")`);
  return new Set(names as Phase[]);
}

function flags(argv: string[]): Flags {
  const { values } = parseArgs({
    args: argv,
    options: {
      seconds: { type: 'string' },
      quick: { type: 'boolean', default: false },
      runs: { type: 'string', default: '1' },
      connections: { type: 'string', default: '4' },
      batch: { type: 'string', default: '500' },
      'single-connections': { type: 'string', default: '16' },
      'alert-rate': { type: 'string', default: '1000' },
      'alert-batch': { type: 'string', default: '10' },
      'decision-rate': { type: 'string', default: '500' },
      workers: { type: 'string', default: '2' },
      'durable-db': { type: 'boolean', default: false },
      profile: { type: 'boolean', default: false },
      only: { type: 'string' },
    },
  });
  const quick = values.quick ?? false;
  return {
    seconds: Number(values.seconds ?? (quick ? 6 : 20)),
    runs: Number(values.runs),
    connections: Number(values.connections),
    batch: Number(values.batch),
    singleConnections: Number(values['single-connections']),
    alertRate: Number(values['alert-rate']),
    alertBatch: Number(values['alert-batch']),
    decisionRate: Number(values['decision-rate']),
    workers: Number(values.workers),
    durableDb: values['durable-db'] ?? false,
    profile: values.profile ?? false,
    phases: phasesOf(values.only),
    // Chargebacks arrive 3 to 45 days late: the history has to reach back far enough for labelled fraud.
    // (--quick shortens the phases only: a smaller history leaves too few labelled fraud to calibrate on.)
    cardholders: 500,
    days: 40,
  };
}

const pct = (xs: number[], p: number) => {
  if (xs.length === 0) return Number.NaN;
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.max(0, Math.ceil((p / 100) * s.length) - 1))];
};
const median = (xs: number[]) => pct(xs.filter((x) => Number.isFinite(x)), 50);

/**
 * Invented live traffic from the demo world (the same cardholders as the seeded history), with
 * ids of our own per phase. Every `alertEvery`-th transaction gets a large amount, so a share of
 * the load is alert-worthy.
 */
class Traffic {
  private readonly stream: IterableIterator<SimulatedTransaction>;
  private n = 0;

  constructor(cardholders: number, private readonly alertEvery = 25) {
    const world = createDemoWorld({ seed: DEMO_WORLD_SEED, cardholders });
    this.stream = world.live({ startAt: new Date(), ratePerSecond: 1000, fraudRate: 0.05 });
  }

  take(tag: string, count: number): Payload[] {
    const out: Payload[] = [];
    for (let i = 0; i < count; i += 1) {
      const s = this.stream.next().value as SimulatedTransaction;
      const p = toIngestPayload(s) as unknown as Payload;
      this.n += 1;
      p.id = `${tag}-${this.n}`;
      if (this.n % this.alertEvery === 0) p.amount = p.currency === 'JPY' ? '480000' : '4800.00';
      out.push(p);
    }
    return out;
  }
}

/**
 * Statements and commits MariaDB ran over a phase (its global status counters; the bench's own
 * queries between the two readings are a handful), to tell how well the group commit groups.
 */
async function dbMeter(stack: Stack): Promise<(per: number, unit: string) => Promise<string>> {
  const read = async () => {
    const rows = await stack.db.sequelize.query<{ Variable_name: string; Value: string }>(
      "SHOW GLOBAL STATUS WHERE Variable_name IN ('Questions', 'Com_commit')",
      { type: QueryTypes.SELECT },
    );
    return new Map(rows.map((r) => [r.Variable_name, Number(r.Value)]));
  };
  const a = await read();
  return async (per, unit) => {
    const b = await read();
    const q = b.get('Questions')! - a.get('Questions')!;
    const c = b.get('Com_commit')! - a.get('Com_commit')!;
    return `MariaDB ran ${q} statements and ${c} commits: ${(q / per).toFixed(2)} statements and ${(c / per).toFixed(2)} commits per ${unit}`;
  };
}

const ALERT_SHARE = 0.03;

async function alertOnTopShare(stack: Stack, tag: string, share: number): Promise<number> {
  const rows = await stack.db.sequelize.query<{ p: number }>(
    'SELECT s.probability AS p FROM transactions t JOIN transaction_scores s ON s.transaction_id = t.id WHERE t.external_id LIKE :p',
    { replacements: { p: `${tag}-%` }, type: QueryTypes.SELECT },
  );
  const threshold = pct(rows.map((r) => r.p), 100 * (1 - share));
  const current = await readAlertingSettings(stack.db);
  await writeAlertingSettings(stack.db, { ...current, threshold, reviewBand: Math.min(current.reviewBand, threshold) }, null);
  const redis = createRedis(stack.config, { name: 'bench-settings' });
  try {
    await publishEvents(redis, stack.config.REDIS_PREFIX, [{ type: 'settings.changed', at: new Date().toISOString() }]);
  } finally {
    redis.disconnect();
  }
  await sleep(500);
  return threshold;
}

interface RunFigures {
  acceptedPerS: number;
  scoredPerS: number;
  batchDrainS: number;
  singlePerS: number;
  singleP99: number;
  scoredP50: number;
  scoredP95: number;
  scoredP99: number;
  alertP50: number;
  alertP95: number;
  alertP99: number;
  alertsSeen: number;
  alertRateAchieved: number;
  decisionP50: number;
  decisionP95: number;
  decisionP99: number;
  decisionRateAchieved: number;
  lost: number;
  duplicated: number;
  otherFailures: number;
  checked: number;
}

async function autocannonBodies(stack: Stack, bodies: string[], o: { connections: number; seconds: number; log: ResponseLog; idsOf: string[][] }) {
  let next = 0;
  const result = await autocannon({
    url: `${stack.baseUrl}/api/v1/transactions`,
    connections: o.connections,
    duration: o.seconds,
    // Bounded by count too: never more requests than prepared bodies (no id is sent twice).
    maxOverallRequests: bodies.length,
    timeout: 30,
    requests: [
      {
        method: 'POST',
        headers: { 'content-type': 'application/json', authorization: `Bearer ${stack.apiKey}` },
        setupRequest: (req, context) => {
          const i = next++;
          if (i >= bodies.length) return { ...req, body: '{"transactions":[]}' };
          context.i = i;
          return { ...req, body: bodies[i] };
        },
        onResponse: (status, body, context) => {
          const ids = o.idsOf[context.i as number];
          if (!ids) return;
          if (status === 202) {
            const results = (JSON.parse(body) as { results: { status: 'accepted' | 'duplicate' | 'rejected' }[] }).results;
            results.forEach((r, k) => o.log.record(ids[k], r.status));
          } else for (const id of ids) o.log.record(id, status === 503 ? '503' : `http-${status}`);
        },
      },
    ],
  });
  return result;
}

async function oneRun(stack: Stack, f: Flags, traffic: Traffic, alerts: AlertListener, run: number): Promise<RunFigures> {
  const say = (l: string) => console.log(`[bench run ${run}] ${l}`);
  const checks: { tag: string; log: ResponseLog }[] = [];

  let acceptedPerS = Number.NaN;
  let scoredPerS = Number.NaN;
  let drain: number | null | undefined;
  let singlePerS = Number.NaN;
  let singleP99 = Number.NaN;
  let scoredLatencies: number[] = [];
  let alertLatencies: number[] = [];
  let alertRateAchieved = Number.NaN;
  let meter: ReturnType<typeof cpuMeter>;

  // ── batch ───────────────────────────────────────────────────────────────
  if (f.phases.has('batch')) {
    const batchTag = `bpb${run}`;
    const batchRequests = Math.ceil((f.seconds * 12_000) / f.batch);
    say(`preparing ${batchRequests} batches of ${f.batch}`);
    const batchItems = Array.from({ length: batchRequests }, () => traffic.take(batchTag, f.batch));
    const batchBodies = batchItems.map((items) => JSON.stringify({ transactions: items }));
    const batchLog = new ResponseLog();
    checks.push({ tag: batchTag, log: batchLog });
    const batchStartedAt = Date.now();
    meter = cpuMeter(stack);
    const batch = await autocannonBodies(stack, batchBodies, { connections: f.connections, seconds: f.seconds, log: batchLog, idsOf: batchItems.map((b) => b.map((t) => t.id)) });
    const accepted = batchLog.accepted().length;
    acceptedPerS = accepted / batch.duration;
    say(`batch: ${accepted} accepted in ${batch.duration.toFixed(1)} s (${acceptedPerS.toFixed(0)}/s), answers ${JSON.stringify(batch.statusCodeStats)}, errors ${batch.errors}`);
    drain = await waitUntilScored(stack.db, batchTag, accepted, 300_000);
    say(`batch: ${meter()}`);
    const [sc] = await stack.db.sequelize.query<{ n: number; last: Date }>(
      'SELECT COUNT(*) AS n, MAX(s.scored_at) AS last FROM transactions t JOIN transaction_scores s ON s.transaction_id = t.id WHERE t.external_id LIKE :p',
      { replacements: { p: `${batchTag}%` }, type: QueryTypes.SELECT },
    );
    const scoredWindow = (new Date(sc.last).getTime() - batchStartedAt) / 1000;
    scoredPerS = Number(sc.n) / scoredWindow;
    say(`batch: ${sc.n} scored by ${scoredWindow.toFixed(1)} s after the start (${scoredPerS.toFixed(0)}/s); queue drained ${drain?.toFixed(1) ?? 'not'} s after the load`);

    // A share of what follows alerts: the threshold goes to the score that the top `ALERT_SHARE` of
    // the batch phase reached (the demo model trained on a small history alerts on very little).
    const threshold = await alertOnTopShare(stack, batchTag, ALERT_SHARE);
    say(`alert threshold set to ${threshold.toFixed(4)} (top ${(ALERT_SHARE * 100).toFixed(0)}% of the batch phase's scores)`);
  }

  // ── single ──────────────────────────────────────────────────────────────
  if (f.phases.has('single')) {
    const singleTag = `bps${run}`;
    const singleSeconds = Math.max(5, Math.round(f.seconds / 2));
    const singleItems = Array.from({ length: singleSeconds * 4_000 }, () => traffic.take(singleTag, 1));
    const singleBodies = singleItems.map((items) => JSON.stringify(items[0]));
    const singleLog = new ResponseLog();
    checks.push({ tag: singleTag, log: singleLog });
    meter = cpuMeter(stack);
    const singleStatements = await dbMeter(stack);
    const single = await autocannonBodies(stack, singleBodies, {
      connections: f.singleConnections,
      seconds: singleSeconds,
      log: singleLog,
      idsOf: singleItems.map((b) => b.map((t) => t.id)),
    });
    singlePerS = single['2xx'] / single.duration;
    singleP99 = single.latency.p99;
    say(`single: ${single['2xx']} 2xx in ${single.duration.toFixed(1)} s (${singlePerS.toFixed(0)} requests/s), p99 ${single.latency.p99} ms, answers ${JSON.stringify(single.statusCodeStats)}`);
    await waitUntilScored(stack.db, singleTag, singleLog.accepted().length, 300_000);
    say(`single: ${meter()}`);
    say(`single: ${await singleStatements(single['2xx'], 'request')} (and the scoring workers' share)`);
  }

  // ── alerts at a steady rate ────────────────────────────────────────────
  if (f.phases.has('alerts')) {
    const alertTag = `bpa${run}`;
    const alertSeconds = Math.max(5, Math.round(f.seconds / 2));
    const alertItems = traffic.take(alertTag, alertSeconds * f.alertRate);
    const alertLog = new ResponseLog();
    checks.push({ tag: alertTag, log: alertLog });
    alerts.received.clear();
    meter = cpuMeter(stack);
    let k = 0;
    const paced = await runLoad({
      baseUrl: stack.baseUrl,
      apiKey: stack.apiKey,
      ratePerSecond: f.alertRate,
      batchSize: f.alertBatch,
      seconds: alertSeconds,
      maxTransactions: alertItems.length,
      make: () => alertItems[k++],
      log: alertLog,
      maxInFlight: 256,
    });
    await waitUntilScored(stack.db, alertTag, alertLog.accepted().length, 120_000);
    say(`alerts: ${meter()}`);
    await sleep(1_000);
    alertLatencies = [];
    for (const [id, times] of alerts.received) {
      const sent = alertLog.sentAt.get(id);
      if (sent !== undefined && id.startsWith(`${alertTag}-`)) alertLatencies.push(times[0] - sent);
    }
    const lat = await stack.db.sequelize.query<{ ms: number }>(
      'SELECT s.latency_ms AS ms FROM transactions t JOIN transaction_scores s ON s.transaction_id = t.id WHERE t.external_id LIKE :p',
      { replacements: { p: `${alertTag}-%` }, type: QueryTypes.SELECT },
    );
    scoredLatencies = lat.map((r) => Number(r.ms));
    alertRateAchieved = paced.sent / paced.seconds;
    say(
      `alerts: ${paced.sent} sent at ${alertRateAchieved.toFixed(0)}/s in requests of ${f.alertBatch}; ${alertLatencies.length} alerts pushed; ` +
        `ingest→alert p50 ${pct(alertLatencies, 50).toFixed(0)} p95 ${pct(alertLatencies, 95).toFixed(0)} p99 ${pct(alertLatencies, 99).toFixed(0)} ms; ` +
        `request p99 ${pct(alertLog.requestLatencies, 99).toFixed(0)} ms`,
    );
  }

  // ── synchronous decisions at a steady rate ──────────────────────────────
  let decisionLatencies: number[] = [];
  let decisionRateAchieved = Number.NaN;
  if (f.phases.has('decisions')) {
    // One second at the rate first, not counted in the latencies (its transactions are accounted like
    // the rest): the decision path has not run before this phase, and its first requests run code the
    // JIT has not compiled yet, which is not what an authorisation system running all day sees.
    const warmTag = `bpw${run}`;
    const warmItems = traffic.take(warmTag, f.decisionRate);
    const warmLog = new ResponseLog();
    checks.push({ tag: warmTag, log: warmLog });
    const decide = (items: Payload[], seconds: number, log: ResponseLog) => {
      let i = 0;
      return runLoad({
        baseUrl: stack.baseUrl,
        apiKey: stack.apiKey,
        path: '/api/v1/decisions',
        ratePerSecond: f.decisionRate,
        batchSize: 1,
        seconds,
        maxTransactions: items.length,
        make: () => items[i++],
        log,
        maxInFlight: 256,
      });
    };
    await decide(warmItems, 1, warmLog);
    const decisionTag = `bpd${run}`;
    const decisionSeconds = Math.max(5, Math.round(f.seconds / 2));
    const decisionItems = traffic.take(decisionTag, decisionSeconds * f.decisionRate);
    const decisionLog = new ResponseLog();
    checks.push({ tag: decisionTag, log: decisionLog });
    meter = cpuMeter(stack);
    const statements = await dbMeter(stack);
    const dec = await decide(decisionItems, decisionSeconds, decisionLog);
    decisionRateAchieved = dec.sent / dec.seconds;
    decisionLatencies = decisionLog.requestLatencies;
    say(`decisions: ${await statements(dec.sent, 'decision')}`);
    say(`decisions: ${meter()}`);
    say(`decisions: ${dec.sent} at ${decisionRateAchieved.toFixed(0)}/s (after ${warmLog.requestLatencies.length} not counted to warm up), answers ${JSON.stringify(Object.fromEntries(decisionLog.http))}`);
    // Where the time goes: the handler's own time (`latencyMs` in each answer: from the route's start to
    // the answer, so without the HTTP parsing before it and the wait for the event loop) beside the
    // time the client saw, and the client's p99 second by second (a tail spread over the phase or one bad second).
    const sv = decisionLog.serverLatencies;
    const bySecond: number[][] = [];
    decisionLog.requestSentAt.forEach((t, i) => {
      const sec = Math.floor((t - decisionLog.requestSentAt[0]) / 1000);
      (bySecond[sec] ??= []).push(decisionLog.requestLatencies[i]);
    });
    say(
      `decisions: in the handler p50 ${pct(sv, 50).toFixed(1)} p95 ${pct(sv, 95).toFixed(1)} p99 ${pct(sv, 99).toFixed(1)} ms; ` +
        `seen by the client p50 ${pct(decisionLog.requestLatencies, 50).toFixed(1)} p99 ${pct(decisionLog.requestLatencies, 99).toFixed(1)} ms; ` +
        `client p99 per second ${bySecond.map((xs) => pct(xs, 99).toFixed(0)).join(' ')} ms`,
    );
  }

  // ── accounting ──────────────────────────────────────────────────────────
  let lost = 0;
  let duplicated = 0;
  let otherFailures = 0;
  let checked = 0;
  for (const c of checks) {
    await waitUntilScored(stack.db, c.tag, c.log.kept().length, 120_000);
    const a = await account(stack.db, c.tag, c.log);
    lost += a.lost;
    duplicated += a.duplicated;
    otherFailures += a.otherFailures;
    checked += c.log.kept().length;
    if (a.lost || a.duplicated || a.otherFailures) say(`${c.tag}: ${JSON.stringify(a)}`);
  }
  return {
    acceptedPerS,
    scoredPerS,
    batchDrainS: drain ?? Number.NaN,
    singlePerS,
    singleP99,
    scoredP50: pct(scoredLatencies, 50),
    scoredP95: pct(scoredLatencies, 95),
    scoredP99: pct(scoredLatencies, 99),
    alertP50: pct(alertLatencies, 50),
    alertP95: pct(alertLatencies, 95),
    alertP99: pct(alertLatencies, 99),
    alertsSeen: alertLatencies.length,
    alertRateAchieved,
    decisionP50: pct(decisionLatencies, 50),
    decisionP95: pct(decisionLatencies, 95),
    decisionP99: pct(decisionLatencies, 99),
    decisionRateAchieved,
    lost,
    duplicated,
    otherFailures,
    checked,
  };
}

export async function run(argv: string[]): Promise<void> {
  const f = flags(argv);
  const profileDir = path.join(ROOT, '.data', 'bench-profiles');
  if (f.profile) mkdirSync(profileDir, { recursive: true });
  console.log(`pipeline benchmark: ${f.runs} run(s) of ${f.seconds} s; ${f.workers} worker processes; MariaDB ${f.durableDb ? 'durable (flush at commit, binlog)' : 'test profile (redo log flushed once a second)'}`);
  const seedStarted = Date.now();
  const stack = await startStack({
    name: 'bench',
    ports: { db: Number(process.env.BENCH_DB_PORT ?? 3947), redis: Number(process.env.BENCH_REDIS_PORT ?? 6947), web: Number(process.env.BENCH_PORT ?? 4947) },
    workers: f.workers,
    fastDb: !f.durableDb,
    bufferPoolMb: 512,
    // Statements slower than 50 ms land in logs/mariadb-slow.log, to see what a phase waited on.
    extraDbArgs: ['--slow-query-log=1', '--long-query-time=0.05', `--slow-query-log-file=${path.join(ROOT, '.data', 'bench', 'logs', 'mariadb-slow.log')}`],
    // Node names each profile by pid and thread, so the main thread's is not overwritten by tsx's loader thread.
    nodeArgs: f.profile ? (role, i) => ['--cpu-prof', `--cpu-prof-dir=${path.join(profileDir, `${role}-${i}`)}`] : undefined,
    seed: async (db, c) => {
      const redis = createRedis(c, { name: 'bench-seed' });
      try {
        const h = await seedDemoHistory(db, redis, c, { days: f.days, cardholders: f.cardholders, labelDelayDays: 10, log: (l) => console.log(`[seed] ${l}`) });
        console.log(`[seed] ${h.rows} historical transactions and the first champion in ${((Date.now() - seedStarted) / 1000).toFixed(0)} s`);
      } finally {
        redis.disconnect();
      }
    },
  });
  let alerts: AlertListener | undefined;
  const runs: RunFigures[] = [];
  try {
    alerts = await listenForAlerts(stack.baseUrl);
    const traffic = new Traffic(f.cardholders);
    for (let r = 1; r <= f.runs; r += 1) runs.push(await oneRun(stack, f, traffic, alerts, r));
  } finally {
    alerts?.close();
    await stack.stop();
    if (f.profile) console.log(`CPU profiles of the web server and workers: ${profileDir}`);
  }

  const m = (k: keyof RunFigures) => median(runs.map((x) => x[k]));
  const fmt = (x: number, digits = 0) => (Number.isFinite(x) ? x.toFixed(digits) : 'n/a');
  type Row = [string, number, number, 'min' | 'max', string];
  const rows: Row[] = [
    ['batch ingest, accepted transactions/s', m('acceptedPerS'), 5_000, 'min', '/s'],
    ['batch ingest, scored transactions/s', m('scoredPerS'), 5_000, 'min', '/s'],
    ['single-transaction requests/s', m('singlePerS'), 1_500, 'min', '/s'],
    ['ingest → scored p50 at the alert rate', m('scoredP50'), Number.NaN, 'max', 'ms'],
    ['ingest → scored p95', m('scoredP95'), Number.NaN, 'max', 'ms'],
    ['ingest → scored p99', m('scoredP99'), Number.NaN, 'max', 'ms'],
    ['ingest → socket alert p50', m('alertP50'), Number.NaN, 'max', 'ms'],
    ['ingest → socket alert p95', m('alertP95'), Number.NaN, 'max', 'ms'],
    ['ingest → socket alert p99', m('alertP99'), 250, 'max', 'ms'],
    ['synchronous decision p50', m('decisionP50'), Number.NaN, 'max', 'ms'],
    ['synchronous decision p95', m('decisionP95'), Number.NaN, 'max', 'ms'],
    ['synchronous decision p99', m('decisionP99'), 20, 'max', 'ms'],
    ['lost (accepted, never scored)', m('lost'), 0, 'max', ''],
    ['duplicated (scores, alerts, pushes)', m('duplicated'), 0, 'max', ''],
  ];
  console.log(
    `\nMedians of ${runs.length} run(s); alert phase at ${fmt(m('alertRateAchieved'))} transactions/s in requests of ${f.alertBatch} ` +
      `(${fmt(m('alertsSeen'))} alerts pushed per run), decisions at ${fmt(m('decisionRateAchieved'))}/s; ${fmt(m('checked'))} transactions accounted per run.\n`,
  );
  console.log(
    table(
      ['figure', 'measured', 'goal', 'ratio', 'met'],
      rows.map(([name, v, goal, kind, unit]) => [
        name,
        Number.isFinite(v) ? `${fmt(v, unit === 'ms' ? 1 : 0)}${unit ? ` ${unit}` : ''}` : 'not run',
        Number.isFinite(goal) ? `${kind === 'min' ? '≥' : goal === 0 ? '=' : '<'} ${goal}${unit ? ` ${unit}` : ''}` : '',
        Number.isFinite(goal) && goal !== 0 && Number.isFinite(v) ? `${(v / goal).toFixed(2)}×` : '',
        !Number.isFinite(goal) || !Number.isFinite(v) ? '' : kind === 'min' ? (v >= goal ? 'yes' : 'no') : goal === 0 ? (v === 0 ? 'yes' : 'no') : v < goal ? 'yes' : 'no',
      ]),
    ),
  );
  if (runs.length > 1) {
    console.log('\nper run: accepted/s, scored/s, single req/s, alert p99, decision p99');
    for (const r of runs) console.log(`  ${fmt(r.acceptedPerS)}  ${fmt(r.scoredPerS)}  ${fmt(r.singlePerS)}  ${fmt(r.alertP99)}  ${fmt(r.decisionP99, 1)}`);
  }
}
