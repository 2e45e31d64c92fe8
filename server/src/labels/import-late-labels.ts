import type { Readable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import { parse, CsvError } from 'csv-parse';
import { QueryTypes } from 'sequelize';
import { LATE_LABEL_COLUMNS, LATE_LABEL_FRAUD_TYPES, type LabelImport } from '@shared/api/models';
import type { Database } from '../db/database';
import type { Config } from '../config/index';
import { logger, scrubDigits } from '../lib/logger';
import { ErrorReport, isStorageFull, storageFullFailure, type ReportLine } from '../backfill/error-report';
import { UploadProblem } from '../backfill/receive-upload';
import { createLabelImport, findLabelImport, finishLabelImport, labelReportRoot } from './label-import-repository';

const CHUNK_ROWS = 500;
const MAX_RECORD_CHARS = 4 * 1024;
/** A report date may be a few minutes ahead of this server's clock (another system's clock), not more. */
const CLOCK_SKEW_MS = 5 * 60_000;
/** The upstream transaction id, as ingest accepts it. */
const ID_PATTERN = /^[A-Za-z0-9._:-]{1,64}$/;
const DATE_ONLY = /^(\d{4})-(\d{2})-(\d{2})$/;
const DATE_TIME = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(:\d{2}(\.\d{1,6})?)?(Z|[+-]\d{2}:\d{2})$/;

export interface LateLabelsInput {
  user: { id: number };
  fileName: string;
  file: Readable;
  now?: Date;
}

export interface LateLabelsOutcome {
  view: LabelImport;
  failure: { status: number; code: string; message: string } | null;
}

const fileProblem = (code: string, message: string) => new UploadProblem(400, code, message);

const LABELS_STORAGE_FULL = storageFullFailure('the labels');

function readHeader(cells: string[]): string[] {
  const names = cells.map((c) => c.trim());
  const expected: readonly string[] = LATE_LABEL_COLUMNS;
  const unknown = names.filter((n) => !expected.includes(n));
  if (unknown.length > 0 || new Set(names).size !== names.length) {
    throw fileProblem(
      'invalid_header',
      `The first line must be the header naming the columns ${LATE_LABEL_COLUMNS.join(', ')} (once each); it has ${unknown.length > 0 ? `unknown columns ${unknown.slice(0, 5).map((n) => `"${scrubDigits(n).slice(0, 40)}"`).join(', ')}` : 'a column twice'}.`,
    );
  }
  const missing = LATE_LABEL_COLUMNS.filter((n) => !names.includes(n));
  if (missing.length > 0) throw fileProblem('invalid_header', `The header row lacks the columns ${missing.join(', ')}.`);
  return names;
}

/** A date the file gives: YYYY-MM-DD (midnight UTC) or an ISO 8601 time with its offset. */
function parseReportedAt(raw: string): Date | null {
  const m = DATE_ONLY.exec(raw);
  if (m) {
    const d = new Date(Date.UTC(Number(m[1]), Number(m[2]) - 1, Number(m[3])));
    return d.getUTCMonth() === Number(m[2]) - 1 && d.getUTCDate() === Number(m[3]) ? d : null;
  }
  if (!DATE_TIME.test(raw)) return null;
  const d = new Date(raw);
  return Number.isNaN(d.getTime()) ? null : d;
}

interface ParsedRow {
  row: number;
  id: string | null;
  value: { externalId: string; reportedAt: Date; fraudType: string } | null;
  problems: ReportLine[];
}

function readRow(header: string[], cells: string[], row: number, now: Date): ParsedRow {
  if (cells.length !== header.length) {
    return { row, id: null, value: null, problems: [{ row, id: null, field: '(row)', message: `has ${cells.length} cells but the header has ${header.length} columns` }] };
  }
  const rec: Record<string, string> = Object.create(null);
  header.forEach((name, i) => (rec[name] = cells[i].trim()));
  const problems: ReportLine[] = [];
  const idOk = ID_PATTERN.test(rec.transactionId);
  // The id cell is echoed only when it is a well-formed id; anything else could carry a card number or a formula.
  const id = idOk ? rec.transactionId : null;
  if (!idOk) problems.push({ row, id: null, field: 'transactionId', message: 'must be the upstream transaction id: 1-64 characters of A-Z, a-z, 0-9 and . _ : -' });
  const reportedAt = parseReportedAt(rec.reportedAt);
  if (!reportedAt) problems.push({ row, id, field: 'reportedAt', message: 'must be a date (YYYY-MM-DD) or an ISO 8601 time with its offset, e.g. 2026-03-14T09:30:00Z' });
  else if (reportedAt.getTime() > now.getTime() + CLOCK_SKEW_MS) problems.push({ row, id, field: 'reportedAt', message: 'is in the future' });
  const fraudTypes: readonly string[] = LATE_LABEL_FRAUD_TYPES;
  if (!fraudTypes.includes(rec.fraudType)) problems.push({ row, id, field: 'fraudType', message: `must be one of ${LATE_LABEL_FRAUD_TYPES.join(', ')}` });
  if (problems.length > 0) return { row, id, value: null, problems };
  return { row, id, value: { externalId: rec.transactionId, reportedAt: reportedAt!, fraudType: rec.fraudType }, problems };
}

/**
 * Late labels: a CSV of chargebacks reported weeks after the transaction
 * (transactionId, reportedAt, fraudType). Each row becomes a fraud label with
 * source "chargeback" at its reported time, so training as of an earlier date
 * does not see it. Rows are checked one by one: an unknown transaction, a
 * report before the transaction, a bad date or fraud type rejects that row
 * alone (listed in the error report, cells made safe for spreadsheets); a
 * chargeback already recorded for the transaction counts as a duplicate.
 */
export async function importLateLabels(d: { db: Database; config: Pick<Config, 'UPLOAD_DIR'> }, input: LateLabelsInput): Promise<LateLabelsOutcome> {
  const now = input.now ?? new Date();
  const id = await createLabelImport(d.db, { userId: input.user.id, fileName: input.fileName, startedAt: now });
  const report = new ErrorReport(labelReportRoot(d.config.UPLOAD_DIR), id);
  const counts = { rowsRead: 0, added: 0, duplicate: 0, rejected: 0 };
  const seen = new Set<string>();
  let failure: LateLabelsOutcome['failure'] = null;

  const store = async (rows: ParsedRow[]) => {
    const valid = rows.filter((r) => r.value !== null);
    const ids = [...new Set(valid.map((r) => r.value!.externalId))];
    const found = ids.length
      ? await d.db.sequelize.query<{ id: number; external_id: string; occurred_at: Date; chargeback: number }>(
          `SELECT t.id, t.external_id, t.occurred_at, EXISTS (SELECT 1 FROM labels l WHERE l.transaction_id = t.id AND l.source = 'chargeback') AS chargeback
           FROM transactions t WHERE t.external_id IN (:ids)`,
          { replacements: { ids }, type: QueryTypes.SELECT },
        )
      : [];
    const byId = new Map(found.map((t) => [t.external_id, t]));
    const inserts: unknown[] = [];
    for (const r of rows) {
      if (!r.value) continue;
      const t = byId.get(r.value.externalId);
      if (!t) {
        r.problems.push({ row: r.row, id: r.id, field: 'transactionId', message: 'no stored transaction has this id (import the transaction first)' });
      } else if (r.value.reportedAt < new Date(t.occurred_at)) {
        r.problems.push({ row: r.row, id: r.id, field: 'reportedAt', message: 'is before the transaction itself' });
      } else if (Number(t.chargeback) === 1 || seen.has(r.value.externalId)) {
        counts.duplicate += 1;
      } else {
        seen.add(r.value.externalId);
        inserts.push(Number(t.id), r.value.fraudType, r.value.reportedAt, input.user.id, now);
        counts.added += 1;
      }
    }
    if (inserts.length > 0) {
      await d.db.sequelize.query(
        `INSERT INTO labels (transaction_id, label, fraud_type, source, reported_at, created_by, created_at)
         VALUES ${Array.from({ length: inserts.length / 5 }, () => "(?, 'fraud', ?, 'chargeback', ?, ?, ?)").join(', ')}`,
        { replacements: inserts, type: QueryTypes.INSERT },
      );
    }
    const rejected = rows.filter((r) => r.problems.length > 0);
    counts.rejected += rejected.length;
    await report.add(rejected.flatMap((r) => r.problems));
  };

  const parser = parse({ bom: true, skip_empty_lines: true, relax_column_count: true, record_delimiter: ['\r\n', '\n', '\r'], max_record_size: MAX_RECORD_CHARS, info: true });
  const piping = pipeline(input.file, parser).catch((err: unknown) => err);
  let pending: ParsedRow[] = [];
  try {
    let header: string[] | null = null;
    for await (const { record, info } of parser as AsyncIterable<{ record: string[]; info: { lines: number } }>) {
      if (record.every((c) => c.trim() === '')) continue;
      if (header === null) {
        header = readHeader(record);
        continue;
      }
      counts.rowsRead += 1;
      pending.push(readRow(header, record, info.lines, now));
      if (pending.length >= CHUNK_ROWS) {
        await store(pending);
        pending = [];
      }
    }
    const streamError = await piping;
    if (streamError) throw streamError;
    if (header === null) throw fileProblem('empty_file', `The file is empty: the first line must be the header ${LATE_LABEL_COLUMNS.join(',')}.`);
    await store(pending);
  } catch (err) {
    if (err instanceof UploadProblem) failure = { status: err.status, code: err.code, message: err.message };
    else if (err instanceof CsvError) failure = { status: 400, code: 'malformed_csv', message: 'The file stops being valid CSV (a quote that is never closed, or a row far too long). Rows before it were imported.' };
    else if (isStorageFull(err)) failure = { ...LABELS_STORAGE_FULL };
    else {
      logger().error({ err, importId: id }, 'late-label import failed');
      failure = { status: 500, code: 'internal', message: 'The import stopped because of a problem on our side; the rows before it were kept.' };
    }
    input.file.destroy();
    await piping;
  }
  await report.close().catch(() => undefined);
  // A report the disk could not take is removed, and the run says so (RFC 4918 §11.5: 507).
  if (isStorageFull(report.error)) {
    failure = { ...LABELS_STORAGE_FULL };
    await report.discard();
  }
  await finishLabelImport(d.db, id, { counts, errorReportFile: report.fileName, failure: failure && { code: failure.code, message: failure.message } });
  const stored = await findLabelImport(d.db, id);
  return { view: stored!.view, failure };
}
