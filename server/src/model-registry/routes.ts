import type { Redis } from 'ioredis';
import { z } from 'zod';
import { compareQuerySchema, promotionDecisionSchema, promotionRequestSchema, shadowQuerySchema } from '@shared/api/models';
import { needs, type RouteSpec } from '../access/route-table';
import type { Database } from '../db/database';
import type { Config } from '../config/index';
import { AppError } from '../lib/app-error';
import { parseOrThrow } from '../lib/validate';
import { activeVersionIds, findVersion, listVersions, versionDetail } from './version-repository';
import { compareVersions } from './compare-versions';
import { shadowComparison } from './shadow-comparison';
import { decidePromotion, listPromotions, requestPromotion, withdrawPromotion, type PromotionDeps } from './promotions';

const idParam = z.coerce.number().int().positive();

export function modelRegistryRoutes(d: { db: Database; redis: Redis; config: Config }): RouteSpec[] {
  const p: PromotionDeps = { db: d.db, redis: d.redis, redisPrefix: d.config.REDIS_PREFIX };
  const id = (raw: unknown, what: string) => parseOrThrow(idParam, raw, what);
  return [
    {
      method: 'get',
      path: '/models',
      access: needs('models:read'),
      summary: 'Every model version with its role, data window, counts and headline evaluation',
      handler: async (_req, res) => {
        const [versions, active] = await Promise.all([listVersions(d.db), activeVersionIds(d.db)]);
        res.json({ versions, championId: active.champion, challengerId: active.challenger });
      },
    },
    // Literal paths before /models/:id.
    {
      method: 'get',
      path: '/models/compare',
      access: needs('models:read'),
      summary: 'Two versions re-scored on one window’s stored features: ROC, PR, alerts at the threshold',
      handler: async (req, res) => {
        const q = parseOrThrow(compareQuerySchema, req.query, 'query string');
        res.json(
          await compareVersions(d.db, {
            a: q.a,
            b: q.b,
            from: q.from ? new Date(q.from) : undefined,
            to: q.to ? new Date(q.to) : undefined,
            labelDelayDays: d.config.LABEL_DELAY_DAYS,
          }),
        );
      },
    },
    {
      method: 'get',
      path: '/models/shadow',
      access: needs('models:read'),
      summary: 'Champion and challenger on the same live transactions: alerts each would raise, precision and recall on labels since',
      handler: async (req, res) => {
        const q = parseOrThrow(shadowQuerySchema, req.query, 'query string');
        res.json(await shadowComparison(d.db, q.days));
      },
    },
    {
      method: 'get',
      path: '/models/:id',
      access: needs('models:read'),
      summary: 'One version: parameters, evaluation, curves, round table, importance, step functions',
      handler: async (req, res) => {
        const found = await findVersion(d.db, id(req.params.id, 'model id'));
        if (!found) throw AppError.notFound('No such model version.');
        res.json({ version: versionDetail(found) });
      },
    },
    {
      method: 'get',
      path: '/promotions',
      access: needs('models:read'),
      summary: 'Promotion and rollback requests, pending first',
      handler: async (_req, res) => {
        res.json({ requests: await listPromotions(d.db) });
      },
    },
    {
      method: 'post',
      path: '/promotions',
      access: needs('models:promote'),
      summary: 'Ask for a version to become champion (promotion or rollback), with a written reason',
      handler: async (req, res) => {
        const body = parseOrThrow(promotionRequestSchema, req.body);
        res.status(201).json({ request: await requestPromotion(p, req, body) });
      },
    },
    {
      method: 'post',
      path: '/promotions/:id/decision',
      access: needs('models:approve'),
      summary: 'Approve (the champion changes in every scoring worker at once) or turn down a promotion request',
      handler: async (req, res) => {
        const requestId = id(req.params.id, 'request id');
        const body = parseOrThrow(promotionDecisionSchema, req.body);
        res.json({ request: await decidePromotion(p, req, requestId, body) });
      },
    },
    {
      method: 'post',
      path: '/promotions/:id/withdraw',
      access: needs('models:promote'),
      summary: 'Withdraw one’s own pending promotion request',
      handler: async (req, res) => {
        res.json({ request: await withdrawPromotion(p, req, id(req.params.id, 'request id')) });
      },
    },
  ];
}
