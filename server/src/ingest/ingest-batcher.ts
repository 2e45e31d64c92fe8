import type { Database } from '../db/database';
import { retryOnDeadlock } from '../db/retry-deadlock';
import { AppError } from '../lib/app-error';
import type { NormalisedTransaction } from '@shared/api/transactions';
import type { DomainEvent } from '../events/event-bus';
import type { AlertingSettings } from '../settings/settings-repository';
import { commitScores, pendingRowOf, type ScoredRow, type ScoreOutcome } from '../scoring/score-transactions';
import { rememberCards, storeTransactions, type TransactionSource } from './transaction-repository';
import { MAX_JOB_IDS, type ScoringQueue } from './ingest-queue';

/**
 * Scores computed before the store (the synchronous decision path), by upstream id: written in the
 * same database transaction as the rows, which are inserted already scored and never queued, so the
 * scoring worker does not compute them again and a crash leaves either both or neither.
 */
export type Prescored = Map<string, { o: Omit<ScoreOutcome, 'transactionId'>; settings: AlertingSettings }>;

export interface StoreOptions {
  prescored?: Prescored;
  /** Announces the alerts a prescored store raised, after its commit. */
  publish?: (events: DomainEvent[]) => Promise<void>;
  /** Queue the new rows with those of the next few milliseconds' batches (ScoringQueue.enqueueSoon), without waiting. */
  gather?: boolean;
}

export interface StoredAndQueued {
  batch: string;
  inserted: Map<string, number>;
  existing: Map<string, number>;
  /**
   * False when the rows were stored but the scoring job could not be added (Redis away): the caller
   * answers 503. Always true for gathered ids, whose job is added after the answer (see `gather`).
   */
  queued: boolean;
}

const DEADLOCK_RETRIES = 8;

/**
 * Stores a batch idempotently (retrying a deadlock) and queues its new rows as scoring jobs of at
 * most 1,000 ids; rows with a prescored outcome are stored with their score instead of queued.
 */
export async function storeAndQueue(
  db: Database,
  scoring: ScoringQueue,
  items: NormalisedTransaction[],
  meta: { source: TransactionSource; apiKeyId: number | null; receivedAt: Date },
  opts: StoreOptions = {},
): Promise<StoredAndQueued> {
  const { prescored } = opts;
  const scored = prescored && prescored.size > 0 ? new Set(prescored.keys()) : undefined;
  let events: DomainEvent[] = [];
  const store = async () => {
    if (!scored || !prescored) return storeTransactions(db, items, meta);
    return db.sequelize.transaction(async (t) => {
      const stored = await storeTransactions(db, items, { ...meta, scored }, t);
      const todo: ScoredRow[] = [];
      for (const it of items) {
        const id = stored.inserted.get(it.externalId);
        const p = prescored.get(it.externalId);
        if (id === undefined || !p) continue;
        const r = pendingRowOf(it, { id, cardId: stored.cardIds.get(it.card.panHash)! }, meta.receivedAt);
        todo.push({ o: { ...p.o, transactionId: id }, r, settings: p.settings });
      }
      events = await commitScores(db, t, todo, { markScored: false });
      return stored;
    });
  };
  // Batches that share cards can deadlock on the card rows' index gaps; a retry after a random pause goes through.
  const stored = await retryOnDeadlock(store, {
    retries: DEADLOCK_RETRIES,
    pauseMs: (attempt) => 5 + Math.random() * 20 * (attempt + 1),
    refuse: () => AppError.unavailable('Too many concurrent batches on the same cards; nothing was accepted. Retry the same request.', 1),
  });
  // Committed: these card ids are real rows from now on.
  rememberCards(db, stored.cardIds);
  if (events.length > 0) await opts.publish?.(events).catch(() => undefined);
  const ids = [...stored.inserted].filter(([externalId]) => !scored?.has(externalId)).map(([, id]) => id);
  let queued = true;
  for (let i = 0; i < ids.length; i += MAX_JOB_IDS) {
    const job = { transactionIds: ids.slice(i, i + MAX_JOB_IDS), batch: i === 0 ? stored.batch : `${stored.batch}-${i / MAX_JOB_IDS}` };
    if (opts.gather) {
      scoring.enqueueSoon(job);
      continue;
    }
    if (!queued) {
      scoring.enqueueLater(job);
      continue;
    }
    try {
      await scoring.enqueue(job);
    } catch {
      // Stored but not queued: queued again from this process once Redis is back (and by the requeue
      // sweeper if this process stops first), so nothing is lost; the caller is told to retry and
      // its retry is answered "duplicate".
      scoring.enqueueLater(job);
      queued = false;
    }
  }
  return { ...stored, queued };
}

interface Submission {
  items: NormalisedTransaction[];
  prescored?: Prescored;
  receivedAt: Date;
  resolve: (r: StoredAndQueued) => void;
  reject: (e: unknown) => void;
}

interface Group {
  meta: { source: TransactionSource; apiKeyId: number | null };
  subs: Submission[];
  size: number;
  /** Carries prescored rows (decisions): flushed one such group at a time, see pump(). */
  scored: boolean;
}

/**
 * Group commit for small ingest requests: requests that arrive while earlier
 * ones are being stored wait and are stored together, in one database
 * transaction, instead of one per request, and their ids join the scoring job
 * being gathered (ScoringQueue.enqueueSoon) instead of a job each. Under
 * light load a request is stored at once (nothing waits on a timer); under
 * heavy load the groups grow, so the per-request round trips (transaction,
 * commit, job) are shared. Every request still gets its own answer per item.
 */
export class IngestBatcher {
  private readonly waiting = new Map<string, Group>();
  /** Flushes of ordinary groups in progress: at most `concurrentFlushes`. */
  private plainRunning = 0;
  /** Flushes with prescored rows in progress: at most one, in a slot of their own, see pump(). */
  private scoredRunning = 0;
  /** Names full groups that wait for a flush slot beside the group now filling under their key. */
  private sealed = 0;

  constructor(
    private readonly db: Database,
    private readonly scoring: ScoringQueue,
    private readonly publish?: StoreOptions['publish'],
    /**
     * Transactions stored together at most; flushes of ordinary groups in progress at once at most.
     * One: a second slot halves the groups, so each request's share of a database transaction
     * grows (measured with the single-transaction benchmark: 1.29 statements per request against
     * 0.85, and no more requests a second).
     */
    private readonly limits = { maxItems: 1000, concurrentFlushes: 1 },
    /** How a group is stored (the unit tests watch the grouping through it). */
    private readonly store: typeof storeAndQueue = storeAndQueue,
  ) {}

  submit(
    items: NormalisedTransaction[],
    meta: { source: TransactionSource; apiKeyId: number | null; receivedAt: Date },
    prescored?: Prescored,
  ): Promise<StoredAndQueued> {
    return new Promise((resolve, reject) => {
      const key = `${meta.source}:${meta.apiKeyId ?? ''}`;
      let g = this.waiting.get(key);
      if (!g || g.size + items.length > this.limits.maxItems) {
        // A full group waits for its slot like any other (the limits hold for it too); a new one fills.
        if (g) {
          this.waiting.delete(key);
          this.waiting.set(`${key}#${++this.sealed}`, g);
        }
        g = { meta: { source: meta.source, apiKeyId: meta.apiKeyId }, subs: [], size: 0, scored: false };
        this.waiting.set(key, g);
      }
      g.subs.push({ items, prescored, receivedAt: meta.receivedAt, resolve, reject });
      g.size += items.length;
      if (prescored && prescored.size > 0) g.scored = true;
      this.pump();
    });
  }

  /**
   * Starts waiting groups whose slot is free. Groups with prescored rows (decisions) go one at a
   * time: two of them at once write alerts and cases side by side and deadlock on those rows, and
   * each retry's pause lands on the decision's latency; one at a time, the next group simply grows
   * while the current one commits. Their slot is their own, so a decision never waits behind an
   * ordinary ingest flush.
   */
  private pump(): void {
    for (const [key, g] of this.waiting) {
      if (g.scored ? this.scoredRunning > 0 : this.plainRunning >= this.limits.concurrentFlushes) continue;
      this.waiting.delete(key);
      void this.flush(g);
    }
  }

  private async flush(g: Group): Promise<void> {
    if (g.scored) this.scoredRunning += 1;
    else this.plainRunning += 1;
    try {
      // One row per upstream id: a repeat in another request of the same group is that request's duplicate.
      const seen = new Set<string>();
      const union: NormalisedTransaction[] = [];
      const prescored: Prescored = new Map();
      for (const s of g.subs) {
        for (const t of s.items) {
          if (seen.has(t.externalId)) continue;
          seen.add(t.externalId);
          union.push(t);
          const p = s.prescored?.get(t.externalId);
          if (p) prescored.set(t.externalId, p);
        }
      }
      // Received when the first of them arrived: the ingest-to-scored latency includes the wait here.
      const receivedAt = new Date(Math.min(...g.subs.map((s) => s.receivedAt.getTime())));
      const stored = await this.store(this.db, this.scoring, union, { ...g.meta, receivedAt }, { prescored, publish: this.publish, gather: true });
      const claimed = new Set<string>();
      for (const s of g.subs) {
        const inserted = new Map<string, number>();
        const existing = new Map<string, number>();
        for (const t of s.items) {
          const id = stored.inserted.get(t.externalId);
          if (id !== undefined && !claimed.has(t.externalId)) {
            claimed.add(t.externalId);
            inserted.set(t.externalId, id);
          } else {
            const prev = id ?? stored.existing.get(t.externalId);
            if (prev !== undefined) existing.set(t.externalId, prev);
          }
        }
        s.resolve({ batch: stored.batch, inserted, existing, queued: stored.queued });
      }
    } catch (err) {
      for (const s of g.subs) s.reject(err);
    } finally {
      if (g.scored) this.scoredRunning -= 1;
      else this.plainRunning -= 1;
      this.pump();
    }
  }
}
