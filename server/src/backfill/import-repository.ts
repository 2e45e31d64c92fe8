import { QueryTypes } from 'sequelize';
import { backfillErrorReportUrl, type BackfillCounts, type BackfillImport } from '@shared/api/backfill';
import type { Database } from '../db/database';

/** A run that has not written for this long is no longer being processed (longer than Node's default 300 s request timeout). */
export const STALE_AFTER_MS = 6 * 60_000;

interface ImportRow {
  id: number;
  user_id: number;
  display_name: string | null;
  file_name: string;
  status: 'running' | 'completed' | 'failed';
  rows_read: number;
  accepted: number;
  duplicate: number;
  rejected: number;
  labels_added: number;
  bytes_read: number | string;
  error_code: string | null;
  error_message: string | null;
  error_report_file: string | null;
  started_at: Date;
  finished_at: Date | null;
  updated_at: Date;
}

export interface ImportRecord {
  view: BackfillImport;
  userId: number;
  errorReportFile: string | null;
}

const SELECT = `SELECT b.*, u.display_name FROM backfill_imports b LEFT JOIN users u ON u.id = b.user_id`;

function toRecord(r: ImportRow, now: Date): ImportRecord {
  const id = Number(r.id);
  const stale = r.status === 'running' && now.getTime() - new Date(r.updated_at).getTime() > STALE_AFTER_MS;
  return {
    userId: Number(r.user_id),
    errorReportFile: r.error_report_file,
    view: {
      id,
      fileName: r.file_name,
      status: stale ? 'interrupted' : r.status,
      counts: {
        rowsRead: Number(r.rows_read),
        accepted: Number(r.accepted),
        duplicate: Number(r.duplicate),
        rejected: Number(r.rejected),
        labelsAdded: Number(r.labels_added),
        bytesRead: Number(r.bytes_read),
      },
      startedAt: new Date(r.started_at).toISOString(),
      finishedAt: r.finished_at ? new Date(r.finished_at).toISOString() : null,
      error: r.error_code ? { code: r.error_code, message: r.error_message ?? '' } : null,
      errorReportUrl: r.error_report_file ? backfillErrorReportUrl(id) : null,
      uploadedBy: { id: Number(r.user_id), displayName: r.display_name ?? `user ${r.user_id}` },
    },
  };
}

export async function createImport(db: Database, o: { userId: number; fileName: string; startedAt: Date }): Promise<number> {
  const [id] = await db.sequelize.query(
    "INSERT INTO backfill_imports (user_id, file_name, status, started_at, updated_at) VALUES (?, ?, 'running', ?, ?)",
    { replacements: [o.userId, o.fileName, o.startedAt, o.startedAt], type: QueryTypes.INSERT },
  );
  return Number(id);
}

export async function saveProgress(db: Database, id: number, c: BackfillCounts, errorReportFile: string | null): Promise<void> {
  await db.sequelize.query(
    `UPDATE backfill_imports SET rows_read = ?, accepted = ?, duplicate = ?, rejected = ?, labels_added = ?, bytes_read = ?,
       error_report_file = ?, updated_at = UTC_TIMESTAMP(3) WHERE id = ?`,
    { replacements: [c.rowsRead, c.accepted, c.duplicate, c.rejected, c.labelsAdded, c.bytesRead, errorReportFile, id], type: QueryTypes.UPDATE },
  );
}

export async function finishImport(
  db: Database,
  id: number,
  o: { counts: BackfillCounts; errorReportFile: string | null; failure: { code: string; message: string } | null; finishedAt: Date },
): Promise<void> {
  await saveProgress(db, id, o.counts, o.errorReportFile);
  await db.sequelize.query('UPDATE backfill_imports SET status = ?, error_code = ?, error_message = ?, finished_at = ? WHERE id = ?', {
    replacements: [o.failure ? 'failed' : 'completed', o.failure?.code ?? null, o.failure?.message.slice(0, 500) ?? null, o.finishedAt, id],
    type: QueryTypes.UPDATE,
  });
}

export async function findImport(db: Database, id: number, now = new Date()): Promise<ImportRecord | null> {
  const [row] = await db.sequelize.query<ImportRow>(`${SELECT} WHERE b.id = ?`, { replacements: [id], type: QueryTypes.SELECT });
  return row ? toRecord(row, now) : null;
}

/** Most recent runs first; `userId` null lists everyone's. */
export async function listImports(db: Database, o: { userId: number | null; limit: number }, now = new Date()): Promise<BackfillImport[]> {
  const rows = await db.sequelize.query<ImportRow>(
    `${SELECT} ${o.userId === null ? '' : 'WHERE b.user_id = :userId'} ORDER BY b.started_at DESC, b.id DESC LIMIT :limit`,
    { replacements: { userId: o.userId, limit: o.limit }, type: QueryTypes.SELECT },
  );
  return rows.map((r) => toRecord(r, now).view);
}
