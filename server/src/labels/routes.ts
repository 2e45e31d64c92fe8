import { sendErrorReport } from '../lib/download';
import type { Request } from 'express';
import { z } from 'zod';
import { needs, type RouteSpec } from '../access/route-table';
import type { Database } from '../db/database';
import type { Config } from '../config/index';
import { AppError } from '../lib/app-error';
import { parseOrThrow } from '../lib/validate';
import { auditRequest } from '../audit/record-audit';
import { receiveCsvUpload } from '../backfill/receive-upload';
import { reportPath } from '../backfill/error-report';
import { labelCoverage, labelDelay } from './label-stats';
import { importLateLabels } from './import-late-labels';
import { findLabelImport, labelReportRoot, listLabelImports, type LabelImportRecord } from './label-import-repository';

const coverageQuery = z.object({ weeks: z.coerce.number().int().min(1).max(104).default(12) });
const delayQuery = z.object({ days: z.coerce.number().int().min(7).max(730).default(180) });

/** The caller's own import, or anyone's for an admin; 404 otherwise, so ids cannot be probed. */
async function visibleImport(db: Database, req: Request): Promise<LabelImportRecord> {
  const raw = String(req.params.id);
  const id = /^[1-9][0-9]{0,9}$/.test(raw) ? Number(raw) : null;
  const found = id === null ? null : await findLabelImport(db, id);
  const user = req.user!;
  if (!found || (found.userId !== user.id && user.role !== 'admin')) throw AppError.notFound('No such label import.');
  return found;
}

export function labelRoutes(d: { db: Database; config: Config }): RouteSpec[] {
  return [
    {
      method: 'get',
      path: '/labels/coverage',
      access: needs('models:read'),
      summary: 'Label coverage by week: transactions, how many are labelled, fraud and legitimate',
      handler: async (req, res) => {
        const q = parseOrThrow(coverageQuery, req.query, 'query string');
        res.json({ weeks: await labelCoverage(d.db, q.weeks) });
      },
    },
    {
      method: 'get',
      path: '/labels/delay',
      access: needs('models:read'),
      summary: 'Label delay: days from transaction to fraud report, by source',
      handler: async (req, res) => {
        const q = parseOrThrow(delayQuery, req.query, 'query string');
        res.json(await labelDelay(d.db, q.days));
      },
    },
    {
      method: 'post',
      path: '/labels/imports',
      access: needs('data:backfill'),
      summary: 'Import late labels (chargebacks) from a CSV upload: transactionId, reportedAt, fraudType',
      handler: async (req, res) => {
        const upload = await receiveCsvUpload(req, () => undefined);
        const { view, failure } = await importLateLabels({ db: d.db, config: d.config }, { user: req.user!, fileName: upload.fileName, file: upload.file });
        await auditRequest(d.db, req, {
          action: 'labels.import',
          targetType: 'label_import',
          targetId: view.id,
          outcome: failure ? 'failure' : 'success',
          details: { fileName: view.fileName, counts: view.counts, ...(failure ? { error: failure.code } : {}) },
        });
        if (failure) {
          res.status(failure.status).json({ error: { code: failure.code, message: failure.message }, import: view });
          return;
        }
        res.json({ import: view });
      },
    },
    {
      method: 'get',
      path: '/labels/imports',
      access: needs('data:backfill'),
      summary: 'Recent late-label imports: the caller’s own; an admin sees everyone’s',
      handler: async (req, res) => {
        const user = req.user!;
        res.json({ imports: await listLabelImports(d.db, { userId: user.role === 'admin' ? null : user.id, limit: 20 }) });
      },
    },
    {
      method: 'get',
      path: '/labels/imports/:id/errors.csv',
      access: needs('data:backfill'),
      summary: 'Per-row error report of one late-label import (row, id, field, message)',
      handler: async (req, res) => {
        const found = await visibleImport(d.db, req);
        const file = found.errorReportFile ? reportPath(labelReportRoot(d.config.UPLOAD_DIR), found.errorReportFile) : null;
        await sendErrorReport(res, file, `late-labels-${found.view.id}-errors.csv`);
      },
    },
  ];
}
