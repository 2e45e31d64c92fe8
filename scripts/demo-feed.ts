/**
 * The demo's live feed: the invented issuer's card traffic, posted to the real
 * ingest API as it happens (`npx tsx scripts/demo-feed.ts`; `npm start`
 * spawns it as a child).
 *
 * Environment:
 *   EDGECASE_URL           base URL of the server (default http://127.0.0.1:${PORT ?? 3000})
 *   EDGECASE_DEMO_API_KEY  bearer key with transactions:write (default edgecase-demo-key)
 *   DEMO_FEED_RATE         transactions per second (default 5)
 *   DEMO_FEED_FRAUD_RATE   share of fraud in the stream (default 0.01)
 *   DEMO_CARDHOLDERS       cardholders of the demo world, as for the history seed (default 3000)
 *   REDIS_HOST, REDIS_PORT, REDIS_PREFIX  (default 127.0.0.1, 6380, edgecase)
 *
 * Control: every 2 s the feed reads the hash `<prefix>:demo-feed:control`
 * (`paused` "1"/"0", `rate` transactions per second), so an admin screen can
 * pause it or change its pace; it writes `<prefix>:demo-feed:stats` (sent,
 * accepted, duplicates, rejected, retries, lastError, lastErrorAt, updatedAt, rate,
 * paused).
 *
 * Delivery: each transaction is sent once its time has come, in batches, so
 * `occurredAt` is the moment of sending (within a tick). On 503, 429, other
 * 5xx or a connection failure the same batch is retried with backoff (the ids
 * are idempotent, so a retry never counts twice); other 4xx answers are
 * counted as rejected and the feed moves on. After an outage longer than a few
 * seconds it resumes at the present instead of replaying the gap.
 *
 * Card numbers travel only inside the request bodies: never in logs, stats
 * or errors.
 */
import { pathToFileURL } from 'node:url';
import { Redis } from 'ioredis';
import { DEMO_FEED_MAX_RATE } from '../shared/src/api/admin';
import { createDemoWorld, DEMO_SEED, toIngestPayload, type DemoWorld, type SimulatedTransaction } from '../server/src/demo/simulator/index';

/** The two hash commands the feed needs (ioredis and ioredis-mock both have them). */
export interface FeedStore {
  hgetall(key: string): Promise<Record<string, string>>;
  hset(key: string, values: Record<string, string | number>): Promise<unknown>;
}

export interface DemoFeedOptions {
  /** Full URL of the ingest endpoint. */
  url: string;
  apiKey: string;
  redis: FeedStore;
  /** Redis key prefix (REDIS_PREFIX). */
  prefix: string;
  world: DemoWorld;
  /** Transactions per second until the control hash says otherwise. */
  rate: number;
  fraudRate?: number;
  /** How often the control hash is read. Default 2,000 ms. */
  controlIntervalMs?: number;
  /** How often due transactions are collected and sent. Default 500 ms. */
  tickMs?: number;
  /** Most transactions per request (the API takes up to 1,000). Default 500. */
  maxBatch?: number;
  /** First retry delay, doubled per attempt up to `retryMaxMs`. Defaults 500 ms and 30 s. */
  retryBaseMs?: number;
  retryMaxMs?: number;
  /** Per-request timeout. Default 15 s. */
  requestTimeoutMs?: number;
  /** Falling further behind than this (an outage, a slow server) restarts the stream at the present. Default 10 s. */
  maxLagMs?: number;
  /** One line per event worth telling; never given a card number. */
  log?: (message: string, fields?: Record<string, string | number | boolean>) => void;
}

export interface FeedStats {
  sent: number;
  accepted: number;
  duplicates: number;
  rejected: number;
  retries: number;
  lastError: string;
  /** When the last error happened (ISO 8601); empty before the first. */
  lastErrorAt: string;
  rate: number;
  paused: boolean;
}

export interface DemoFeed {
  /** Stops after the request in flight (a retry wait ends at once); resolves when the final stats are written. */
  stop(): Promise<void>;
  /** Resolves when the feed has stopped. */
  readonly done: Promise<void>;
  stats(): Readonly<FeedStats>;
}

/** Most transactions per second the control hash may ask for. */
export const MAX_FEED_RATE = DEMO_FEED_MAX_RATE;

/** Runs of 12-19 digits, the length of a card number, scrubbed from anything the feed repeats from a server. */
const DIGIT_RUN = /\d(?:[ -]?\d){11,18}/g;
const scrub = (s: string) => s.replace(DIGIT_RUN, '[digits removed]').slice(0, 300);

const RETRYABLE = (status: number) => status === 429 || status >= 500;

interface IngestAnswer {
  results?: { status?: string; errors?: { path?: string }[] }[];
  error?: { code?: string; message?: string };
}

function parseRate(raw: string | undefined, fallback: number): number {
  const n = Number(raw);
  return raw !== undefined && raw !== '' && Number.isFinite(n) && n > 0 && n <= MAX_FEED_RATE ? n : fallback;
}

/** Starts the feed loop; see the file comment for what it does. */
export function startDemoFeed(o: DemoFeedOptions): DemoFeed {
  const controlKey = `${o.prefix}:demo-feed:control`;
  const statsKey = `${o.prefix}:demo-feed:stats`;
  const controlEvery = o.controlIntervalMs ?? 2000;
  const tick = o.tickMs ?? 500;
  const maxBatch = Math.min(1000, o.maxBatch ?? 500);
  const retryBase = o.retryBaseMs ?? 500;
  const retryMax = o.retryMaxMs ?? 30_000;
  const timeout = o.requestTimeoutMs ?? 15_000;
  const maxLag = o.maxLagMs ?? 10_000;
  const log = o.log ?? ((message, fields) => console.log(JSON.stringify({ msg: message, ...fields })));
  const stats: FeedStats = { sent: 0, accepted: 0, duplicates: 0, rejected: 0, retries: 0, lastError: '', lastErrorAt: '', rate: o.rate, paused: false };
  const stopper = new AbortController();
  let statsDirty = true;

  const sleep = (ms: number) =>
    new Promise<void>((resolve) => {
      if (stopper.signal.aborted) return resolve();
      const timer = setTimeout(done, Math.max(0, ms));
      function done() {
        clearTimeout(timer);
        stopper.signal.removeEventListener('abort', done);
        resolve();
      }
      stopper.signal.addEventListener('abort', done);
    });

  let controlFailing = false;
  async function readControl(): Promise<void> {
    try {
      const c = await o.redis.hgetall(controlKey);
      controlFailing = false;
      const paused = c.paused === '1';
      const rate = parseRate(c.rate, o.rate);
      if (paused !== stats.paused || rate !== stats.rate) {
        log(paused ? 'paused' : 'running', { rate });
        stats.paused = paused;
        stats.rate = rate;
        statsDirty = true;
      }
    } catch (err) {
      // Keep the last known setting; say so once, not every two seconds.
      if (!controlFailing) log('cannot read the control hash; keeping the last setting', { error: scrub(String((err as Error).message)) });
      controlFailing = true;
    }
  }

  async function writeStats(): Promise<void> {
    if (!statsDirty) return;
    try {
      await o.redis.hset(statsKey, {
        sent: stats.sent,
        accepted: stats.accepted,
        duplicates: stats.duplicates,
        rejected: stats.rejected,
        retries: stats.retries,
        lastError: stats.lastError,
        lastErrorAt: stats.lastErrorAt,
        rate: stats.rate,
        paused: stats.paused ? '1' : '0',
        updatedAt: new Date().toISOString(),
      });
      statsDirty = false;
    } catch {
      // Stats are for display; the next write carries the totals anyway.
    }
  }

  function noteError(message: string): void {
    stats.lastError = message;
    stats.lastErrorAt = new Date().toISOString();
    statsDirty = true;
  }

  function tally(batch: SimulatedTransaction[], answer: IngestAnswer | null): void {
    stats.sent += batch.length;
    statsDirty = true;
    const results = Array.isArray(answer?.results) ? answer.results : null;
    if (!results) {
      stats.accepted += batch.length;
      return;
    }
    let rejected = 0;
    const paths = new Set<string>();
    for (const r of results) {
      if (r.status === 'duplicate') stats.duplicates++;
      else if (r.status === 'rejected') {
        rejected++;
        for (const e of r.errors ?? []) if (typeof e.path === 'string') paths.add(scrub(e.path));
      } else stats.accepted++;
    }
    if (rejected > 0) {
      stats.rejected += rejected;
      noteError(`${rejected} of ${batch.length} rejected (${[...paths].slice(0, 5).join(', ')})`);
      log('transactions rejected', { rejected, batch: batch.length, fields: [...paths].slice(0, 5).join(',') });
    }
  }

  /** Posts one batch until it is answered for good (or the feed stops). */
  async function post(batch: SimulatedTransaction[]): Promise<void> {
    const body = JSON.stringify({ transactions: batch.map(toIngestPayload) });
    for (let attempt = 0; !stopper.signal.aborted; attempt++) {
      let wait = Math.min(retryMax, retryBase * 2 ** attempt) * (0.75 + 0.5 * Math.random());
      let failure: string;
      try {
        const res = await fetch(o.url, {
          method: 'POST',
          headers: { 'content-type': 'application/json', authorization: `Bearer ${o.apiKey}` },
          body,
          // Not the stop signal: a request already sent finishes (bounded by the timeout), so the
          // stats count every batch the API received.
          signal: AbortSignal.timeout(timeout),
        });
        const text = await res.text();
        let answer: IngestAnswer | null = null;
        try {
          answer = JSON.parse(text) as IngestAnswer;
        } catch {
          answer = null;
        }
        if (res.ok) {
          tally(batch, answer);
          return;
        }
        failure = `HTTP ${res.status}${answer?.error?.code ? ` ${scrub(answer.error.code)}` : ''}`;
        if (!RETRYABLE(res.status)) {
          stats.sent += batch.length;
          stats.rejected += batch.length;
          noteError(failure);
          log('batch refused', { status: res.status, batch: batch.length, error: failure });
          return;
        }
        const retryAfter = Number(res.headers.get('retry-after'));
        if (Number.isFinite(retryAfter) && retryAfter > 0) wait = Math.min(retryMax, retryAfter * 1000);
      } catch (err) {
        if (stopper.signal.aborted) return;
        const e = err as Error & { cause?: { code?: string } };
        failure = scrub(e.cause?.code ?? e.name ?? 'request failed');
      }
      stats.retries++;
      noteError(failure);
      log('will retry the same batch', { error: failure, attempt: attempt + 1, waitMs: Math.round(wait), batch: batch.length });
      await writeStats();
      await sleep(wait);
    }
  }

  async function run(): Promise<void> {
    let stream: Iterator<SimulatedTransaction> | null = null;
    let head: SimulatedTransaction | null = null;
    let headAt = 0;
    let streamRate = 0;
    let lastStart = 0;
    let lastControl = Number.NEGATIVE_INFINITY;
    let lastStatsAt = 0;
    const advance = () => {
      const next = stream!.next();
      head = next.done ? null : next.value;
      headAt = head ? Date.parse(head.occurredAt) : Number.POSITIVE_INFINITY;
    };
    while (!stopper.signal.aborted) {
      const began = Date.now();
      if (began - lastControl >= controlEvery) {
        lastControl = began;
        await readControl();
      }
      if (stats.paused) {
        stream = null;
      } else {
        if (!stream || streamRate !== stats.rate || began - headAt > maxLag) {
          if (stream) log('restarting the stream at the present', { rate: stats.rate });
          // Whole seconds after the last start: the ids carry the start second, so they never repeat.
          const startAt = Math.max(began, lastStart + 1000);
          lastStart = startAt;
          stream = o.world.live({ startAt: new Date(startAt), fraudRate: o.fraudRate, ratePerSecond: stats.rate });
          streamRate = stats.rate;
          advance();
        }
        const due: SimulatedTransaction[] = [];
        while (head && headAt <= Date.now()) {
          due.push(head);
          advance();
        }
        for (let i = 0; i < due.length && !stopper.signal.aborted; i += maxBatch) await post(due.slice(i, i + maxBatch));
      }
      if (Date.now() - lastStatsAt >= 1000) {
        lastStatsAt = Date.now();
        await writeStats();
      }
      await sleep(tick - (Date.now() - began));
    }
    statsDirty = true;
    await writeStats();
  }

  const done = run().catch((err: Error) => {
    log('feed stopped on an error', { error: scrub(String(err.message)) });
  });
  return {
    stop() {
      stopper.abort();
      return done;
    },
    done,
    stats: () => ({ ...stats }),
  };
}

async function main(): Promise<void> {
  const base = (process.env.EDGECASE_URL ?? `http://127.0.0.1:${process.env.PORT ?? 3000}`).replace(/\/+$/, '');
  const prefix = process.env.REDIS_PREFIX || 'edgecase';
  const redis = new Redis({
    host: process.env.REDIS_HOST ?? '127.0.0.1',
    port: Number(process.env.REDIS_PORT ?? 6380),
    // Fail fast while Redis is away: the feed keeps its last setting and tries again on the next read.
    maxRetriesPerRequest: 1,
    enableOfflineQueue: false,
  });
  redis.on('error', () => undefined);
  // The first control read comes at once, and without an offline queue it fails while the
  // connection is still being made (the "cannot read the control hash" line at every start):
  // wait for the connection first, for at most 5 s (a Redis that is away leaves the defaults).
  await new Promise<void>((resolve) => {
    if (redis.status === 'ready') return resolve();
    const timer = setTimeout(resolve, 5_000);
    redis.once('ready', () => {
      clearTimeout(timer);
      resolve();
    });
  });
  // npm start runs the feed beside the web server: wait for it to answer (at most 120 s), so the
  // first batches are not refused and retried while it is still starting.
  for (const until = Date.now() + 120_000; Date.now() < until; ) {
    const up = await fetch(`${base}/api/health`, { signal: AbortSignal.timeout(2_000) }).then(
      () => true,
      () => false,
    );
    if (up) break;
    await new Promise((r) => setTimeout(r, 500));
  }
  const rate = parseRate(process.env.DEMO_FEED_RATE, 5);
  const fraudEnv = Number(process.env.DEMO_FEED_FRAUD_RATE);
  const fraudRate = process.env.DEMO_FEED_FRAUD_RATE && fraudEnv >= 0 && fraudEnv <= 0.2 ? fraudEnv : 0.01;
  const holdersEnv = Number(process.env.DEMO_CARDHOLDERS);
  const cardholders = Number.isInteger(holdersEnv) && holdersEnv > 0 ? holdersEnv : 3000;
  const feed = startDemoFeed({
    url: `${base}/api/v1/transactions`,
    apiKey: process.env.EDGECASE_DEMO_API_KEY ?? 'edgecase-demo-key',
    redis,
    prefix,
    world: createDemoWorld({ seed: DEMO_SEED, cardholders }),
    rate,
    fraudRate,
  });
  console.log(JSON.stringify({ msg: 'demo feed started', url: `${base}/api/v1/transactions`, rate, fraudRate }));
  let stopping = false;
  void feed.done.then(() => {
    if (stopping) return;
    // The loop ended without being asked to (the reason is logged): exit so the parent sees it.
    void redis.quit().catch(() => undefined).finally(() => process.exit(1));
  });
  const shutdown = () => {
    stopping = true;
    void feed.stop().then(async () => {
      const s = feed.stats();
      console.log(JSON.stringify({ msg: 'demo feed stopped', sent: s.sent, accepted: s.accepted, rejected: s.rejected }));
      await redis.quit().catch(() => undefined);
      process.exit(0);
    });
  };
  process.once('SIGTERM', shutdown);
  process.once('SIGINT', shutdown);
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) void main();
