import { setDownloadHeaders } from '../lib/download';
import path from 'node:path';
import { QueryTypes } from 'sequelize';
import { z } from 'zod';
import { needs, type RouteSpec } from '../access/route-table';
import { AppError } from '../lib/app-error';
import { parseOrThrow } from '../lib/validate';
import { auditRequest } from '../audit/record-audit';
import { cardActionSchema, contactSchema, dispositionSchema, escalateSchema, noteSchema, queueQuerySchema, savedViewsSchema, statusChangeSchema } from '@shared/api/cases';
import { listQueue } from './case-queries';
import { getCaseFile } from './get-case-file';
import { addNote, claimCase, contactCardholder, disposeCase, escalateCase, releaseCase, setCardStatus, setCaseStatus, type CaseDeps } from './case-actions';
import { storeEvidence } from './evidence-store';
import { caseViewer, requireVisibleCase } from './case-access';

const idParam = z.coerce.number().int().positive();

export function caseRoutes(d: CaseDeps): RouteSpec[] {
  const caseId = (raw: unknown) => parseOrThrow(idParam, raw, 'case id');
  return [
    {
      method: 'get',
      path: '/cases',
      access: needs('queue:read'),
      summary: 'The queue: open cases, filtered, sorted and paginated on the server',
      handler: async (req, res) => {
        const q = parseOrThrow(queueQuerySchema, req.query, 'query string');
        res.json(await listQueue(d.db, q, await caseViewer(d.db, req)));
      },
    },
    {
      method: 'get',
      path: '/cases/:id',
      access: needs('queue:read'),
      summary: 'The case file',
      handler: async (req, res) => {
        const id = caseId(req.params.id);
        await requireVisibleCase(d.db, req, id, 'case.view');
        res.json(await getCaseFile(d.db, id, { demoDirectory: d.config.EDGECASE_MODE !== 'production', viewer: await caseViewer(d.db, req) }));
      },
    },
    {
      method: 'post',
      path: '/cases/:id/claim',
      access: needs('case:work'),
      summary: 'Claim a case (atomic: one of two simultaneous claims wins)',
      handler: async (req, res) => {
        res.json({ case: await claimCase(d, req, caseId(req.params.id)) });
      },
    },
    {
      method: 'post',
      path: '/cases/:id/release',
      access: needs('case:work'),
      summary: 'Give a claimed case back to the queue',
      handler: async (req, res) => {
        res.json({ case: await releaseCase(d, req, caseId(req.params.id)) });
      },
    },
    {
      method: 'post',
      path: '/cases/:id/status',
      access: needs('case:work'),
      summary: 'Mark a case claimed or waiting on the cardholder',
      handler: async (req, res) => {
        const body = parseOrThrow(statusChangeSchema, req.body);
        res.json({ case: await setCaseStatus(d, req, caseId(req.params.id), body.status) });
      },
    },
    {
      method: 'post',
      path: '/cases/:id/escalate',
      access: needs('case:work'),
      summary: 'Escalate a case to a supervisor',
      handler: async (req, res) => {
        const body = parseOrThrow(escalateSchema, req.body);
        res.json({ case: await escalateCase(d, req, caseId(req.params.id), body.reason) });
      },
    },
    {
      method: 'post',
      path: '/cases/:id/notes',
      access: needs('case:work'),
      summary: 'Add a plain-text note',
      handler: async (req, res) => {
        const body = parseOrThrow(noteSchema, req.body);
        res.status(201).json({ note: await addNote(d, req, caseId(req.params.id), body.text) });
      },
    },
    {
      method: 'post',
      path: '/cases/:id/evidence',
      access: needs('case:work'),
      summary: 'Upload evidence (PNG, JPEG, PDF or CSV, at most 10 MB)',
      handler: async (req, res) => {
        const id = caseId(req.params.id);
        await requireVisibleCase(d.db, req, id, 'case.evidence');
        const file = await storeEvidence(req, d.config.UPLOAD_DIR);
        const now = new Date();
        const [evidenceId] = (await d.db.sequelize.query(
          'INSERT INTO case_evidence (case_id, uploaded_by, file_name, content_type, size, sha256, storage_key, created_at) VALUES (?, ?, ?, ?, ?, ?, ?, ?)',
          { replacements: [id, req.user!.id, file.fileName, file.contentType, file.size, file.sha256, file.storageKey, now], type: QueryTypes.INSERT },
        )) as unknown as [number];
        await auditRequest(d.db, req, {
          action: 'case.evidence',
          targetType: 'case',
          targetId: id,
          outcome: 'success',
          details: { evidenceId: Number(evidenceId), fileName: file.fileName, contentType: file.contentType, size: file.size, sha256: file.sha256 },
        });
        res.status(201).json({
          evidence: {
            id: Number(evidenceId),
            fileName: file.fileName,
            contentType: file.contentType,
            size: file.size,
            uploadedBy: { id: req.user!.id, displayName: req.user!.displayName },
            createdAt: now.toISOString(),
          },
        });
      },
    },
    {
      method: 'get',
      path: '/cases/:id/evidence/:evidenceId',
      access: needs('queue:read'),
      summary: 'Download one piece of evidence',
      handler: async (req, res) => {
        const id = caseId(req.params.id);
        const evidenceId = parseOrThrow(idParam, req.params.evidenceId, 'evidence id');
        await requireVisibleCase(d.db, req, id, 'case.evidence_download', { evidenceId });
        // Evidence belongs to its case: an id from another case, even one the caller may see, is refused like a missing one.
        const [row] = await d.db.sequelize.query<{ case_id: number; file_name: string; content_type: string; storage_key: string }>(
          'SELECT case_id, file_name, content_type, storage_key FROM case_evidence WHERE id = ?',
          { replacements: [evidenceId], type: QueryTypes.SELECT },
        );
        if (row && Number(row.case_id) !== id) {
          await auditRequest(d.db, req, { action: 'case.evidence_download', targetType: 'case', targetId: id, outcome: 'denied', details: { evidenceId, reason: 'not_on_this_case' } });
        }
        if (!row || Number(row.case_id) !== id) throw AppError.notFound('No such evidence on this case.');
        const root = path.resolve(d.config.UPLOAD_DIR);
        const full = path.resolve(root, row.storage_key);
        if (!full.startsWith(root + path.sep)) throw AppError.notFound('No such evidence on this case.');
        await auditRequest(d.db, req, { action: 'case.evidence_download', targetType: 'case', targetId: id, outcome: 'success', details: { evidenceId } });
        setDownloadHeaders(res, row.file_name, row.content_type);
        // The upload folder may sit under a dot-folder (.data/): allow it explicitly.
        res.sendFile(full, { dotfiles: 'allow' });
      },
    },
    {
      method: 'post',
      path: '/cases/:id/contact',
      access: needs('case:work'),
      summary: 'E-mail the cardholder',
      handler: async (req, res) => {
        const body = parseOrThrow(contactSchema, req.body);
        res.status(201).json({ message: await contactCardholder(d, req, caseId(req.params.id), body) });
      },
    },
    {
      method: 'post',
      path: '/cases/:id/card',
      access: needs('case:work'),
      summary: 'Block or unblock the card (sent to the upstream system)',
      handler: async (req, res) => {
        const body = parseOrThrow(cardActionSchema, req.body);
        res.json({ card: await setCardStatus(d, req, caseId(req.params.id), body) });
      },
    },
    {
      method: 'post',
      path: '/cases/:id/disposition',
      access: needs('case:work'),
      summary: 'Decide the case: confirmed fraud, legitimate or inconclusive',
      handler: async (req, res) => {
        const body = parseOrThrow(dispositionSchema, req.body);
        res.json(await disposeCase(d, req, caseId(req.params.id), body));
      },
    },
    {
      method: 'get',
      path: '/queue/views',
      access: needs('queue:read'),
      summary: 'The caller’s saved queue views and visible columns',
      handler: async (req, res) => {
        const [row] = await d.db.sequelize.query<{ value: string }>("SELECT value FROM user_preferences WHERE user_id = ? AND pref_key = 'queue-views'", {
          replacements: [req.user!.id],
          type: QueryTypes.SELECT,
        });
        res.json(row ? savedViewsSchema.parse(JSON.parse(row.value)) : { views: [] });
      },
    },
    {
      method: 'put',
      path: '/queue/views',
      access: needs('queue:read'),
      summary: 'Save the caller’s queue views',
      handler: async (req, res) => {
        const body = parseOrThrow(savedViewsSchema, req.body);
        await d.db.sequelize.query(
          "INSERT INTO user_preferences (user_id, pref_key, value, updated_at) VALUES (?, 'queue-views', ?, UTC_TIMESTAMP(3)) ON DUPLICATE KEY UPDATE value = VALUES(value), updated_at = VALUES(updated_at)",
          { replacements: [req.user!.id, JSON.stringify(body)], type: QueryTypes.INSERT },
        );
        res.json(body);
      },
    },
    {
      method: 'get',
      path: '/models/:id/scoring-model',
      access: needs('queue:read'),
      summary: 'A model version as JSON, for what-if scoring in the browser',
      handler: async (req, res) => {
        const id = parseOrThrow(idParam, req.params.id, 'model id');
        const [row] = await d.db.sequelize.query<{ model_json: string }>('SELECT model_json FROM model_versions WHERE id = ?', {
          replacements: [id],
          type: QueryTypes.SELECT,
        });
        if (!row) throw AppError.notFound('No such model version.');
        res.set('Cache-Control', 'private, max-age=3600');
        res.type('application/json').send(`{"model":${row.model_json}}`);
      },
    },
  ];
}
