import type { Redis } from 'ioredis';
import type { Database } from '../db/database';
import type { Config } from '../config/index';
import { AppError, type FieldIssue } from '../lib/app-error';
import { parseIngestBody, type NormalisedTransaction } from '@shared/api/transactions';
import { normaliseTransaction } from './normalise-transaction';
import { viewTransactions, type TransactionSource, type TransactionView } from './transaction-repository';
import type { ScoringQueue } from './ingest-queue';
import { storeAndQueue, type IngestBatcher, type Prescored, type StoreOptions } from './ingest-batcher';

export type IngestItemResult =
  | { id: string; status: 'accepted'; transactionId: number }
  | { id: string; status: 'duplicate'; transactionId: number; previous: TransactionView | null }
  | { id: string | null; status: 'rejected'; errors: FieldIssue[] };

export interface IngestDeps {
  db: Database;
  redis: Redis;
  config: Config;
  scoring: ScoringQueue;
  /** Groups small concurrent requests into one transaction and job; without it each request is stored alone. */
  batcher?: IngestBatcher;
  /** Announces alerts raised by prescored rows (see Prescored). */
  publish?: StoreOptions['publish'];
}

/** Requests with fewer valid transactions than this are grouped with concurrent ones (see IngestBatcher). */
const GROUP_BELOW = 100;

/**
 * The ingest story: validate each item on its own, tokenise card numbers,
 * refuse to accept anything while the queue cannot take it (503), store the
 * batch idempotently, queue the new ones for scoring, and answer per item in
 * order: accepted, duplicate (with what was stored before) or rejected.
 */
export async function acceptTransactions(
  d: IngestDeps,
  body: unknown,
  meta: {
    source: TransactionSource;
    apiKeyId: number | null;
    now?: Date;
    /** Scores the valid transactions before they are stored; their scores are stored with them and they are not queued. */
    prescore?: (valid: NormalisedTransaction[]) => Promise<Prescored>;
  },
): Promise<{ results: IngestItemResult[]; acceptedIds: number[]; batch: string | null }> {
  const now = meta.now ?? new Date();
  const parsed = parseIngestBody(body, { now });
  if ('error' in parsed) throw AppError.badRequest('The request body is not a transaction or a batch of transactions.', parsed.error);

  const results: (IngestItemResult | null)[] = parsed.items.map(() => null);
  const valid: { index: number; t: NormalisedTransaction }[] = [];
  const seenInRequest = new Map<string, number>();
  for (const item of parsed.items) {
    if (!item.result.ok) {
      results[item.index] = { id: item.id, status: 'rejected', errors: item.result.issues };
      continue;
    }
    const t = normaliseTransaction(item.result.value, d.config.PAN_HMAC_KEY);
    const earlier = seenInRequest.get(t.externalId);
    if (earlier !== undefined) {
      results[item.index] = { id: t.externalId, status: 'duplicate', transactionId: -1, previous: null };
      continue;
    }
    seenInRequest.set(t.externalId, item.index);
    valid.push({ index: item.index, t });
  }

  if (valid.length > 0 && d.redis.status !== 'ready') {
    throw AppError.unavailable('Scoring queue unavailable; nothing was accepted. Retry the same request.', 2);
  }

  const items = valid.map((v) => v.t);
  const prescored = items.length > 0 && meta.prescore ? await meta.prescore(items) : undefined;
  const storeMeta = { source: meta.source, apiKeyId: meta.apiKeyId, receivedAt: now };
  // Small requests share a transaction and a scoring job with their concurrent neighbours; large ones go alone.
  const stored =
    items.length === 0
      ? null
      : d.batcher && items.length < GROUP_BELOW
        ? await d.batcher.submit(items, storeMeta, prescored)
        : await storeAndQueue(d.db, d.scoring, items, storeMeta, { prescored, publish: d.publish });

  const acceptedIds: number[] = [];
  if (stored) {
    const dupIds = [...stored.existing.keys()];
    const previous = await viewTransactions(d.db, dupIds);
    for (const { index, t } of valid) {
      const newId = stored.inserted.get(t.externalId);
      if (newId !== undefined) {
        results[index] = { id: t.externalId, status: 'accepted', transactionId: newId };
        acceptedIds.push(newId);
      } else {
        const id = stored.existing.get(t.externalId)!;
        results[index] = { id: t.externalId, status: 'duplicate', transactionId: id, previous: previous.get(t.externalId) ?? null };
      }
    }
    // Stored but not queued: it is queued again once Redis is back, and the caller's retry is answered "duplicate".
    if (acceptedIds.length > 0 && !stored.queued) throw AppError.unavailable('Scoring queue unavailable; retry the same request.', 2);
  }
  // In-request repeats point at the first occurrence's outcome.
  for (let i = 0; i < results.length; i += 1) {
    const r = results[i];
    if (r && r.status === 'duplicate' && r.transactionId === -1) {
      const first = results[seenInRequest.get(r.id)!];
      results[i] = { id: r.id, status: 'duplicate', transactionId: first && 'transactionId' in first ? first.transactionId : -1, previous: null };
    }
  }
  return {
    results: results as IngestItemResult[],
    acceptedIds,
    batch: stored?.batch ?? null,
  };
}
