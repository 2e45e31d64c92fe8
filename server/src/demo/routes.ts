import type { Redis } from 'ioredis';
import { demoFeedControlSchema, type DemoFeedState } from '@shared/api/admin';
import { PUBLIC, needs, type RouteSpec } from '../access/route-table';
import { parseOrThrow } from '../lib/validate';
import type { Database } from '../db/database';
import { auditRequest } from '../audit/record-audit';
import type { Config } from '../config/index';
import { AppError } from '../lib/app-error';
import { DEMO_ACCOUNTS } from './demo-accounts';
import { listCapturedMail, readCapturedMail } from './mailbox';

/** Demo-only helpers: the feed's controls, the sign-in hint and the captured-mail viewer. Absent in production. */
export function demoRoutes(c: Config, d: { redis: Redis; db: Database }): RouteSpec[] {
  const demo = c.EDGECASE_MODE !== 'production';
  const controlKey = `${c.REDIS_PREFIX}:demo-feed:control`;
  const statsKey = `${c.REDIS_PREFIX}:demo-feed:stats`;
  const feedState = async (): Promise<DemoFeedState> => {
    const [control, stats] = await Promise.all([d.redis.hgetall(controlKey), d.redis.hgetall(statsKey)]);
    const count = (k: string) => Number(stats[k] ?? 0);
    return {
      requested: {
        paused: control.paused === undefined ? null : control.paused === '1',
        rate: control.rate ? Number(control.rate) : null,
      },
      reported: stats.updatedAt ? { paused: stats.paused === '1', rate: Number(stats.rate), at: stats.updatedAt } : null,
      totals: { sent: count('sent'), accepted: count('accepted'), duplicates: count('duplicates'), rejected: count('rejected'), retries: count('retries') },
      lastError: stats.lastError ? { message: stats.lastError, at: stats.lastErrorAt || null } : null,
    };
  };
  return [
    {
      method: 'get',
      path: '/demo/feed',
      access: needs('demo:control'),
      summary: 'State of the demo transaction feed',
      handler: async (_req, res) => {
        if (!demo) throw AppError.notFound();
        res.json({ feed: await feedState() });
      },
    },
    {
      method: 'put',
      path: '/demo/feed',
      access: needs('demo:control'),
      summary: 'Pause, resume or change the rate of the demo feed',
      handler: async (req, res) => {
        if (!demo) throw AppError.notFound();
        const body = parseOrThrow(demoFeedControlSchema, req.body);
        const fields: Record<string, string> = {};
        if (body.paused !== undefined) fields.paused = body.paused ? '1' : '0';
        if (body.rate !== undefined) fields.rate = String(body.rate);
        await d.redis.hset(controlKey, fields);
        await auditRequest(d.db, req, { action: 'demo.feed_control', targetType: 'demo_feed', outcome: 'success', details: body });
        res.json({ feed: await feedState() });
      },
    },
    {
      method: 'get',
      path: '/demo/info',
      access: PUBLIC,
      summary: 'Demo accounts shown on the sign-in page (demo and test modes only)',
      handler: (_req, res) => {
        if (!demo) throw AppError.notFound();
        res.json({ demo: true, accounts: DEMO_ACCOUNTS.map(({ email, role }) => ({ email, role })), password: c.DEMO_PASSWORD });
      },
    },
    {
      method: 'get',
      path: '/demo/mail',
      access: needs('mail:read-demo'),
      summary: 'Mail captured by the local SMTP catcher',
      handler: async (_req, res) => {
        if (!demo || !c.MAIL_CATCHER_DIR) throw AppError.notFound('No demo mailbox here.');
        res.json({ messages: await listCapturedMail(c.MAIL_CATCHER_DIR) });
      },
    },
    {
      method: 'get',
      path: '/demo/mail/:id',
      access: needs('mail:read-demo'),
      summary: 'One captured mail',
      handler: async (req, res) => {
        if (!demo || !c.MAIL_CATCHER_DIR) throw AppError.notFound('No demo mailbox here.');
        const mail = await readCapturedMail(c.MAIL_CATCHER_DIR, String(req.params.id));
        if (!mail) throw AppError.notFound('No such message.');
        res.json({ message: mail });
      },
    },
  ];
}
