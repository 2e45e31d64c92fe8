import { sendErrorReport } from '../lib/download';
import type { Request } from 'express';
import { BACKFILL_PROGRESS_EVENT } from '@shared/api/backfill';
import { needs, type RouteSpec } from '../access/route-table';
import type { Database } from '../db/database';
import type { Config } from '../config/index';
import { AppError } from '../lib/app-error';
import { auditRequest } from '../audit/record-audit';
import type { SocketHub } from '../realtime/socket-hub';
import { pushToSockets } from '../realtime/event-bridge';
import type { VelocityStore } from '../scoring/velocity';
import { findImport, listImports, type ImportRecord } from './import-repository';
import { importTransactionsCsv } from './import-transactions-csv';
import { receiveCsvUpload } from './receive-upload';
import { reportPath } from './error-report';

interface BackfillRouteDeps {
  db: Database;
  config: Config;
  velocity: VelocityStore;
  hub: SocketHub;
}

const RECENT_IMPORTS = 25;

/** The caller's own run, or anyone's for an admin; 404 otherwise, so run ids cannot be probed. */
async function visibleImport(db: Database, req: Request): Promise<ImportRecord> {
  const raw = String(req.params.id);
  const id = /^[1-9][0-9]{0,9}$/.test(raw) ? Number(raw) : null;
  const found = id === null ? null : await findImport(db, id);
  const user = req.user!;
  if (!found || (found.userId !== user.id && user.role !== 'admin')) throw AppError.notFound('No such import.');
  return found;
}

export function backfillRoutes(d: BackfillRouteDeps): RouteSpec[] {
  return [
    {
      method: 'post',
      path: '/backfill/transactions',
      access: needs('data:backfill'),
      summary: 'Import historical transactions (optionally labelled) from a CSV upload, streamed; answers with the final summary',
      handler: async (req, res) => {
        let bytes = 0;
        let upload: Awaited<ReturnType<typeof receiveCsvUpload>>;
        try {
          upload = await receiveCsvUpload(req, (total) => (bytes = total));
        } catch (err) {
          // Declared too large: do not read 200 MB just to refuse it.
          if (err instanceof AppError && err.status === 413) res.set('Connection', 'close');
          throw err;
        }
        const user = req.user!;
        const outcome = await importTransactionsCsv(
          {
            db: d.db,
            velocity: d.velocity,
            config: d.config,
            emit: (userId, event) => pushToSockets(d.hub, BACKFILL_PROGRESS_EVENT, event, { userId }),
          },
          {
            user: { id: user.id, displayName: user.displayName },
            fileName: upload.fileName,
            clientRef: upload.clientRef,
            file: upload.file,
            bytesRead: () => bytes,
          },
        );
        const { view, failure } = outcome;
        await auditRequest(d.db, req, {
          action: 'backfill.import',
          targetType: 'backfill_import',
          targetId: view.id,
          outcome: failure ? 'failure' : 'success',
          details: { fileName: view.fileName, status: view.status, counts: view.counts, ...(failure ? { error: failure.code } : {}) },
        });
        if (failure) {
          // RFC 9110 §10.2.3: a 503 says when to come back.
          if (failure.status === 503) res.set('Retry-After', '2');
          res.status(failure.status).json({ error: { code: failure.code, message: failure.message }, import: view });
          return;
        }
        res.json({ import: view });
      },
    },
    {
      method: 'get',
      path: '/backfill',
      access: needs('data:backfill'),
      summary: 'Recent CSV imports: the caller’s own; an admin sees everyone’s',
      handler: async (req, res) => {
        const user = req.user!;
        const imports = await listImports(d.db, { userId: user.role === 'admin' ? null : user.id, limit: RECENT_IMPORTS });
        res.json({ imports });
      },
    },
    {
      method: 'get',
      path: '/backfill/:id',
      access: needs('data:backfill'),
      summary: 'Progress or summary of one CSV import',
      handler: async (req, res) => {
        const found = await visibleImport(d.db, req);
        res.json({ import: found.view });
      },
    },
    {
      method: 'get',
      path: '/backfill/:id/errors.csv',
      access: needs('data:backfill'),
      summary: 'Per-row error report of one CSV import (line, id, field, message)',
      handler: async (req, res) => {
        const found = await visibleImport(d.db, req);
        const file = found.errorReportFile ? reportPath(d.config.UPLOAD_DIR, found.errorReportFile) : null;
        await sendErrorReport(res, file, `import-${found.view.id}-errors.csv`);
      },
    },
  ];
}
