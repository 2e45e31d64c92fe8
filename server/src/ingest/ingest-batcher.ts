import type { Database } from '../db/database';
import { retryOnDeadlock } from '../db/retry-deadlock';
import { AppError } from '../lib/app-error';
import type { NormalisedTransaction } from '@shared/api/transactions';
import { storeTransactions, type TransactionSource } from './transaction-repository';
import type { ScoringQueue } from './ingest-queue';

export interface StoredAndQueued {
  batch: string;
  inserted: Map<string, number>;
  existing: Map<string, number>;
  /** False when the rows were stored but the scoring job could not be added (Redis away): the caller answers 503. */
  queued: boolean;
}

const DEADLOCK_RETRIES = 8;

/** Stores a batch idempotently (retrying a deadlock) and queues its new rows as scoring jobs of at most 1,000 ids. */
export async function storeAndQueue(
  db: Database,
  scoring: ScoringQueue,
  items: NormalisedTransaction[],
  meta: { source: TransactionSource; apiKeyId: number | null; receivedAt: Date },
): Promise<StoredAndQueued> {
  // Batches that share cards can deadlock on the card rows' index gaps; a retry after a random pause goes through.
  const stored = await retryOnDeadlock(() => storeTransactions(db, items, meta), {
    retries: DEADLOCK_RETRIES,
    pauseMs: (attempt) => 5 + Math.random() * 20 * (attempt + 1),
    refuse: () => AppError.unavailable('Too many concurrent batches on the same cards; nothing was accepted. Retry the same request.', 1),
  });
  const ids = [...stored.inserted.values()];
  let queued = true;
  for (let i = 0; i < ids.length; i += 1000) {
    const job = { transactionIds: ids.slice(i, i + 1000), batch: i === 0 ? stored.batch : `${stored.batch}-${i / 1000}` };
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
  receivedAt: Date;
  resolve: (r: StoredAndQueued) => void;
  reject: (e: unknown) => void;
}

interface Group {
  meta: { source: TransactionSource; apiKeyId: number | null };
  subs: Submission[];
  size: number;
}

/**
 * Group commit for small ingest requests: requests that arrive while earlier
 * ones are being stored wait and are stored together, in one database
 * transaction and one scoring job, instead of one of each per request. Under
 * light load a request is stored at once (nothing waits on a timer); under
 * heavy load the groups grow, so the per-request round trips (transaction,
 * commit, job) are shared. Every request still gets its own answer per item.
 */
export class IngestBatcher {
  private readonly waiting = new Map<string, Group>();
  private running = 0;

  constructor(
    private readonly db: Database,
    private readonly scoring: ScoringQueue,
    /** Transactions stored together at most; flushes in progress at once at most. */
    private readonly limits = { maxItems: 1000, concurrentFlushes: 2 },
  ) {}

  submit(items: NormalisedTransaction[], meta: { source: TransactionSource; apiKeyId: number | null; receivedAt: Date }): Promise<StoredAndQueued> {
    return new Promise((resolve, reject) => {
      const key = `${meta.source}:${meta.apiKeyId ?? ''}`;
      let g = this.waiting.get(key);
      if (!g || g.size + items.length > this.limits.maxItems) {
        if (g) this.waiting.delete(key);
        if (g) void this.flush(g);
        g = { meta: { source: meta.source, apiKeyId: meta.apiKeyId }, subs: [], size: 0 };
        this.waiting.set(key, g);
      }
      g.subs.push({ items, receivedAt: meta.receivedAt, resolve, reject });
      g.size += items.length;
      this.pump();
    });
  }

  private pump(): void {
    while (this.running < this.limits.concurrentFlushes && this.waiting.size > 0) {
      const [key, g] = this.waiting.entries().next().value as [string, Group];
      this.waiting.delete(key);
      void this.flush(g);
    }
  }

  private async flush(g: Group): Promise<void> {
    this.running += 1;
    try {
      // One row per upstream id: a repeat in another request of the same group is that request's duplicate.
      const seen = new Set<string>();
      const union: NormalisedTransaction[] = [];
      for (const s of g.subs) {
        for (const t of s.items) {
          if (seen.has(t.externalId)) continue;
          seen.add(t.externalId);
          union.push(t);
        }
      }
      // Received when the first of them arrived: the ingest-to-scored latency includes the wait here.
      const receivedAt = new Date(Math.min(...g.subs.map((s) => s.receivedAt.getTime())));
      const stored = await storeAndQueue(this.db, this.scoring, union, { ...g.meta, receivedAt });
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
      this.running -= 1;
      this.pump();
    }
  }
}
