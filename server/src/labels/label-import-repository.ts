import path from 'node:path';
import { QueryTypes } from 'sequelize';
import type { Database } from '../db/database';
import type { LabelImport } from '@shared/api/models';

/** Late-label reports live in their own folder under UPLOAD_DIR (the back-fill report writer is reused with this root). */
export const labelReportRoot = (uploadDir: string) => path.join(uploadDir, 'labels');
export const labelErrorReportUrl = (id: number) => `/api/labels/imports/${id}/errors.csv`;

interface Row {
  id: number;
  user_id: number;
  display_name: string | null;
  file_name: string;
  status: LabelImport['status'];
  rows_read: number;
  added: number;
  duplicate: number;
  rejected: number;
  error_code: string | null;
  error_message: string | null;
  error_report_file: string | null;
  started_at: Date;
  finished_at: Date | null;
}

export interface LabelImportRecord {
  view: LabelImport;
  userId: number;
  errorReportFile: string | null;
}

function toRecord(r: Row): LabelImportRecord {
  const id = Number(r.id);
  return {
    userId: Number(r.user_id),
    errorReportFile: r.error_report_file,
    view: {
      id,
      fileName: r.file_name,
      status: r.status,
      counts: { rowsRead: Number(r.rows_read), added: Number(r.added), duplicate: Number(r.duplicate), rejected: Number(r.rejected) },
      error: r.error_code ? { code: r.error_code, message: r.error_message ?? '' } : null,
      errorReportUrl: r.error_report_file ? labelErrorReportUrl(id) : null,
      uploadedBy: { id: Number(r.user_id), displayName: r.display_name ?? `user ${r.user_id}` },
      startedAt: new Date(r.started_at).toISOString(),
      finishedAt: r.finished_at ? new Date(r.finished_at).toISOString() : null,
    },
  };
}

const SELECT = 'SELECT i.*, u.display_name FROM label_imports i LEFT JOIN users u ON u.id = i.user_id';

export async function createLabelImport(db: Database, o: { userId: number; fileName: string; startedAt: Date }): Promise<number> {
  const [id] = await db.sequelize.query("INSERT INTO label_imports (user_id, file_name, status, started_at) VALUES (?, ?, 'running', ?)", {
    replacements: [o.userId, o.fileName, o.startedAt],
    type: QueryTypes.INSERT,
  });
  return Number(id);
}

export async function finishLabelImport(
  db: Database,
  id: number,
  o: { counts: LabelImport['counts']; errorReportFile: string | null; failure: { code: string; message: string } | null },
): Promise<void> {
  await db.sequelize.query(
    `UPDATE label_imports SET status = ?, rows_read = ?, added = ?, duplicate = ?, rejected = ?, error_code = ?, error_message = ?,
       error_report_file = ?, finished_at = UTC_TIMESTAMP(3) WHERE id = ?`,
    {
      replacements: [
        o.failure ? 'failed' : 'completed',
        o.counts.rowsRead,
        o.counts.added,
        o.counts.duplicate,
        o.counts.rejected,
        o.failure?.code ?? null,
        o.failure?.message.slice(0, 500) ?? null,
        o.errorReportFile,
        id,
      ],
      type: QueryTypes.UPDATE,
    },
  );
}

export async function findLabelImport(db: Database, id: number): Promise<LabelImportRecord | null> {
  const [row] = await db.sequelize.query<Row>(`${SELECT} WHERE i.id = ?`, { replacements: [id], type: QueryTypes.SELECT });
  return row ? toRecord(row) : null;
}

export async function listLabelImports(db: Database, o: { userId: number | null; limit: number }): Promise<LabelImport[]> {
  const rows = await db.sequelize.query<Row>(`${SELECT} ${o.userId === null ? '' : 'WHERE i.user_id = :userId'} ORDER BY i.id DESC LIMIT :limit`, {
    replacements: { userId: o.userId, limit: o.limit },
    type: QueryTypes.SELECT,
  });
  return rows.map((r) => toRecord(r).view);
}
