import type { Redis } from 'ioredis';
import { PUBLIC, type RouteSpec } from '../access/route-table';
import type { Database } from '../db/database';
import type { HealthResponse } from '@shared/api/auth';

const VERSION = process.env.npm_package_version ?? '0.1.0';

async function timed(check: () => Promise<unknown>, timeoutMs = 2_000) {
  const start = performance.now();
  try {
    await Promise.race([
      check(),
      new Promise((_, reject) => setTimeout(() => reject(new Error(`no answer within ${timeoutMs} ms`)), timeoutMs).unref()),
    ]);
    return { ok: true, latencyMs: Math.round((performance.now() - start) * 10) / 10 };
  } catch (err) {
    return { ok: false, latencyMs: Math.round(performance.now() - start), error: (err as Error).message };
  }
}

export function healthRoutes(d: { db: Database; redis: Redis }): RouteSpec[] {
  return [
    {
      method: 'get',
      path: '/health',
      access: PUBLIC,
      summary: 'Liveness and dependencies (MariaDB, Redis)',
      handler: async (_req, res) => {
        const [db, redis] = await Promise.all([timed(() => d.db.ping()), timed(() => d.redis.ping())]);
        const body: HealthResponse = { status: db.ok && redis.ok ? 'ok' : 'degraded', checks: { db, redis }, version: VERSION };
        res.set('Cache-Control', 'no-store');
        res.status(body.status === 'ok' ? 200 : 503).json(body);
      },
    },
  ];
}
