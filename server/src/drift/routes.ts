import { z } from 'zod';
import { needs, type RouteSpec } from '../access/route-table';
import type { Database } from '../db/database';
import { AppError } from '../lib/app-error';
import { parseOrThrow } from '../lib/validate';
import { auditRequest } from '../audit/record-audit';
import type { DriftQueue } from './drift-queue';
import { listDriftReports } from './drift-repository';

const listQuery = z.object({
  modelVersionId: z.coerce.number().int().positive().optional(),
  limit: z.coerce.number().int().min(1).max(365).default(60),
});

export function driftRoutes(d: { db: Database; queue: DriftQueue }): RouteSpec[] {
  return [
    {
      method: 'get',
      path: '/drift/reports',
      access: needs('models:read'),
      summary: 'Daily drift reports (PSI of the score and every feature against the training baseline), oldest first',
      handler: async (req, res) => {
        const q = parseOrThrow(listQuery, req.query, 'query string');
        res.json({ reports: await listDriftReports(d.db, { modelVersionId: q.modelVersionId ?? null, limit: q.limit }) });
      },
    },
    {
      method: 'post',
      path: '/drift/reports',
      access: needs('models:train'),
      summary: 'Compute the champion’s drift report now (queued; the report arrives over the socket)',
      handler: async (req, res) => {
        let jobId: string;
        try {
          jobId = await d.queue.runNow(req.user!.id);
        } catch {
          throw AppError.unavailable('The drift queue is unreachable right now; try again in a moment.');
        }
        await auditRequest(d.db, req, { action: 'drift.run', targetType: 'drift_report', outcome: 'success', details: { jobId } });
        res.status(202).json({ queued: true });
      },
    },
  ];
}
