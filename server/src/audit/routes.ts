import { setDownloadHeaders } from '../lib/download';
import { needs, type RouteSpec } from '../access/route-table';
import { parseOrThrow } from '../lib/validate';
import type { Database } from '../db/database';
import { AUDIT_EXPORT_MAX_ROWS, auditQuerySchema, type AuditVerification } from '@shared/api/audit';
import { auditRequest } from './record-audit';
import { verifyAuditChain } from './audit-repository';
import { auditFacets, auditRowsForExport, CSV_HEADER, searchAudit } from './audit-queries';
import { writeCsv } from './csv-export';

export function auditRoutes(d: { db: Database }): RouteSpec[] {
  return [
    {
      method: 'get',
      path: '/audit',
      access: needs('audit:read'),
      summary: 'The audit log, filtered by person, action, record and time, newest first',
      handler: async (req, res) => {
        const q = parseOrThrow(auditQuerySchema, req.query, 'query string');
        res.set('Cache-Control', 'no-store');
        res.json(await searchAudit(d.db, q));
      },
    },
    {
      method: 'get',
      path: '/audit/facets',
      access: needs('audit:read'),
      summary: 'Actions, people and record types to filter the audit log by',
      handler: async (_req, res) => {
        res.json(await auditFacets(d.db));
      },
    },
    {
      method: 'get',
      path: '/audit/export.csv',
      access: needs('audit:read'),
      summary: `The filtered audit log as CSV (oldest first, at most ${AUDIT_EXPORT_MAX_ROWS} rows; formula cells neutralised)`,
      handler: async (req, res) => {
        const { page: _page, pageSize: _size, ...filter } = parseOrThrow(auditQuerySchema, req.query, 'query string');
        // The export itself is recorded before it starts: who took which slice of the log.
        await auditRequest(d.db, req, { action: 'audit.export', targetType: 'audit_log', outcome: 'success', details: { filter } });
        setDownloadHeaders(res, `edgecase-audit-${new Date().toISOString().slice(0, 10)}.csv`, 'text/csv; charset=utf-8');
        await writeCsv(res, CSV_HEADER, auditRowsForExport(d.db, filter, AUDIT_EXPORT_MAX_ROWS));
      },
    },
    {
      method: 'post',
      path: '/audit/verify',
      access: needs('audit:read'),
      summary: 'Recompute the hash chain and report the first row that does not match',
      handler: async (req, res) => {
        const result = await verifyAuditChain(d.db);
        const answer: AuditVerification = { ...result, verifiedAt: new Date().toISOString() };
        await auditRequest(d.db, req, { action: 'audit.verify', targetType: 'audit_log', outcome: result.ok ? 'success' : 'failure', details: { ...result } });
        res.json(answer);
      },
    },
  ];
}
