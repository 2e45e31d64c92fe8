import type { Redis } from 'ioredis';
import { z } from 'zod';
import type { RouteSpec } from '../access/route-table';
import type { Database } from '../db/database';
import type { Config } from '../config/index';
import { AppError } from '../lib/app-error';
import { parseOrThrow } from '../lib/validate';
import type { NormalisedTransaction } from '@shared/api/transactions';
import { publishEvents, type DomainEvent } from '../events/event-bus';
import type { ActiveModels } from '../scoring/active-models';
import { pendingRowOf, scorePendingRow, type ScoreOutcome } from '../scoring/score-transactions';
import type { VelocityStore } from '../scoring/velocity';
import { acceptTransactions } from './accept-transactions';
import { IngestBatcher } from './ingest-batcher';
import type { ScoringQueue } from './ingest-queue';
import { viewTransactions } from './transaction-repository';

interface IngestRouteDeps {
  db: Database;
  redis: Redis;
  config: Config;
  scoring: ScoringQueue;
  velocity: VelocityStore;
  models: ActiveModels;
}

const apiKey = (scope: string) => ({ kind: 'apiKey', scope }) as const;

export function ingestRoutes(routeDeps: IngestRouteDeps): RouteSpec[] {
  const publish = (events: DomainEvent[]) => publishEvents(routeDeps.redis, routeDeps.config.REDIS_PREFIX, events);
  const d = { ...routeDeps, publish, batcher: new IngestBatcher(routeDeps.db, routeDeps.scoring, publish) };
  const observe = (t: NormalisedTransaction) =>
    d.velocity.observe(t.card.panHash, {
      transactionId: t.externalId,
      occurredAt: t.occurredAt,
      amount: t.amount,
      merchantRef: t.merchant.id,
      merchantCountry: t.merchant.country,
      lat: t.lat ?? null,
      lon: t.lon ?? null,
      deviceId: t.deviceId ?? null,
    });
  return [
    {
      method: 'post',
      path: '/v1/transactions',
      access: apiKey('transactions:write'),
      summary: 'Submit one transaction or a batch of up to 1,000 for scoring',
      handler: async (req, res) => {
        const { results } = await acceptTransactions(d, req.body, { source: 'api', apiKeyId: req.apiKey?.id ?? null });
        res.status(202).json({ results });
      },
    },
    {
      method: 'get',
      path: '/v1/transactions/:id',
      access: apiKey('transactions:read'),
      summary: 'Status, score, probability, reason codes and alert of one transaction',
      handler: async (req, res) => {
        const id = parseOrThrow(z.string().min(1).max(64), req.params.id, 'transaction id');
        const view = (await viewTransactions(d.db, [id])).get(id);
        if (!view) throw AppError.notFound('No transaction with that id.');
        res.json({ transaction: view });
      },
    },
    {
      method: 'post',
      path: '/v1/decisions',
      access: apiKey('decisions:write'),
      summary: 'Score one transaction at authorisation time and recommend approve, review or decline',
      handler: async (req, res) => {
        const started = performance.now();
        const { champion, challenger, settings } = await d.models.current();
        if (!champion) throw AppError.unavailable('No champion model is active yet.', 10);
        const body = req.body && typeof req.body === 'object' && 'transactions' in req.body ? null : req.body;
        if (body === null) throw AppError.badRequest('A decision takes one transaction, not a batch.', [{ path: 'transactions', message: 'Send a single transaction object.' }]);
        // Velocity state first (idempotent per transaction id), then the score, which is stored in the
        // same database transaction as the row: the scoring worker never computes it again.
        let computed: ScoreOutcome | undefined;
        const { results } = await acceptTransactions(d, body, {
          source: 'decision',
          apiKeyId: req.apiKey?.id ?? null,
          prescore: async ([t]) => {
            const snapshot = await observe(t);
            // Ids are not known before the store; the score does not depend on them.
            const o = scorePendingRow({ champion, challenger, settings }, pendingRowOf(t, { id: 0, cardId: 0 }, new Date()), snapshot);
            computed = o;
            return new Map([[t.externalId, { o, settings }]]);
          },
        });
        const r = results[0];
        if (!r || r.status === 'rejected') {
          throw AppError.badRequest('The transaction is not valid.', r && r.status === 'rejected' ? r.errors : []);
        }
        if (r.status === 'duplicate' && r.previous?.score) {
          // Same id as before: the same answer, nothing scored twice.
          const p = r.previous.score.probability;
          return res.json({
            id: r.id,
            duplicate: true,
            probability: p,
            normalizedMargin: r.previous.score.normalizedMargin,
            action: p >= settings.declineBand ? 'decline' : p >= settings.reviewBand ? 'review' : 'approve',
            reasons: r.previous.score.reasons.slice(0, 3),
            modelVersionId: r.previous.score.modelVersionId,
          });
        }
        const s = computed!;
        res.json({
          id: r.id,
          duplicate: r.status === 'duplicate',
          probability: s.probability,
          normalizedMargin: s.normalizedMargin,
          action: s.probability >= settings.declineBand ? 'decline' : s.probability >= settings.reviewBand ? 'review' : 'approve',
          reasons: s.reasons.slice(0, 3),
          modelVersionId: champion.id,
          latencyMs: Math.round((performance.now() - started) * 100) / 100,
          caution: 'The score is evidence, not a verdict; the decision follows your institution’s policy.',
        });
      },
    },
  ];
}
