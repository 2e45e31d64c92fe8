import type { Readable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import { parse, CsvError } from 'csv-parse';
import {
  BACKFILL_COLUMNS,
  BACKFILL_REQUIRED_COLUMNS,
  backfillErrorReportUrl,
  type BackfillCounts,
  type BackfillImport,
  type BackfillProgressEvent,
} from '@shared/api/backfill';
import { nestCsvRecord, validateBackfillTransaction, type Issue } from '@shared/api/transactions';
import type { Database } from '../db/database';
import type { Config } from '../config/index';
import type { VelocityStore } from '../scoring/velocity';
import { AppError } from '../lib/app-error';
import { logger, scrubDigits } from '../lib/logger';
import { normaliseTransaction } from '../ingest/normalise-transaction';
import { createImport, findImport, finishImport, saveProgress } from './import-repository';
import { ErrorReport, isStorageFull, storageFullFailure, type ReportLine } from './error-report';
import { UploadProblem } from './receive-upload';
import { storeHistoricalBatch, type HistoricalItem } from './store-historical';

export const CHUNK_ROWS = 500;
/** Progress events at most this often (a few per second); the last one always goes out. */
export const PROGRESS_INTERVAL_MS = 250;
/** A run that waits on a slow upload still marks itself alive this often. */
const HEARTBEAT_MS = 30_000;
const MAX_RECORD_CHARS = 64 * 1024;
const INTERNAL_FAILURE = { status: 500, code: 'internal', message: 'The import stopped because of a problem on our side; the rows before it were kept.' };
const STORAGE_FULL_FAILURE = storageFullFailure('the rows');
/** RFC 9110 §15.6.4: a transient refusal the client may retry (the route sends Retry-After). */
const BUSY_FAILURE = {
  status: 503,
  code: 'unavailable',
  message: 'The database stayed busy with live transactions on the same cards, so the import stopped; the rows before it were imported. Upload the same file again shortly (imported rows count as duplicates).',
};

export interface ImportDeps {
  db: Database;
  velocity: VelocityStore;
  config: Pick<Config, 'PAN_HMAC_KEY' | 'UPLOAD_DIR'>;
  /** Sends a progress event to the uploader's sockets. */
  emit: (userId: number, event: BackfillProgressEvent) => void;
}

export interface ImportInput {
  user: { id: number; displayName: string };
  fileName: string;
  clientRef: string | null;
  /** The file's bytes; `bytesRead` reports how many have arrived. */
  file: Readable;
  bytesRead: () => number;
  now?: Date;
}

export interface ImportOutcome {
  view: BackfillImport;
  /** Set when the run stopped on a whole-file problem; the HTTP status to answer with. */
  failure: { status: number; code: string; message: string } | null;
}

/** A whole-file problem found while reading: the run stops and says why. */
const fileProblem = (code: string, message: string) => new UploadProblem(400, code, message);

const listNames = (names: string[]) => {
  const shown = names.slice(0, 5).map((n) => `"${scrubDigits(n).slice(0, 40)}"`);
  return shown.join(', ') + (names.length > 5 ? ` and ${names.length - 5} more` : '');
};

/** Checks the header row; returns the column names or throws naming what is wrong. */
function readHeader(cells: string[]): string[] {
  const names = cells.map((c) => c.trim());
  if (names.some((n) => n === '')) throw fileProblem('invalid_header', 'The header row has an empty column name: every column needs a name from the list of columns.');
  const seen = new Set<string>();
  const repeated = names.filter((n) => (seen.has(n) ? true : (seen.add(n), false)));
  if (repeated.length > 0) throw fileProblem('invalid_header', `The header row names a column twice: ${listNames([...new Set(repeated)])}.`);
  const unknown = names.filter((n) => !BACKFILL_COLUMNS.includes(n));
  if (unknown.length > 0) {
    throw fileProblem(
      'invalid_header',
      `The header row has unknown columns: ${listNames(unknown)}. The first line must be the header, naming columns from the list (card.number, merchant.mcc, ...), spelled as shown.`,
    );
  }
  const missing = BACKFILL_REQUIRED_COLUMNS.filter((n) => !names.includes(n));
  if (missing.length > 0) throw fileProblem('invalid_header', `The header row lacks required columns: ${missing.join(', ')}.`);
  return names;
}

/** csv-parse errors can quote the offending text (a card number, say), so only our own words go out. */
function csvProblem(err: CsvError): UploadProblem {
  const line = typeof (err as { lines?: number }).lines === 'number' ? ` at line ${(err as { lines?: number }).lines}` : '';
  const what =
    err.code === 'CSV_MAX_RECORD_SIZE'
      ? `a row is longer than ${MAX_RECORD_CHARS / 1024} KiB (often a quote that is never closed)`
      : err.code === 'CSV_QUOTE_NOT_CLOSED'
        ? 'a quoted cell is never closed'
        : err.code === 'CSV_INVALID_CLOSING_QUOTE' || err.code === 'INVALID_OPENING_QUOTE'
          ? 'a quote is misplaced (a cell with quotes must be wholly quoted, with inner quotes doubled)'
          : 'the file cannot be read as CSV';
  return fileProblem('malformed_csv', `The file stops being valid CSV${line}: ${what}. Rows before it were imported; fix the file and upload it again (imported rows count as duplicates).`);
}

interface PendingRow {
  row: number;
  item: HistoricalItem | null;
  rejected: ReportLine[];
}

/** Sends progress at most every PROGRESS_INTERVAL_MS, and keeps the stored run from looking abandoned. */
class ProgressPump {
  private lastEmit = 0;
  private lastSave = Date.now();

  constructor(
    private readonly send: () => void,
    private readonly heartbeat: () => Promise<void>,
  ) {}

  tick(force = false): void {
    const now = Date.now();
    if (force || now - this.lastEmit >= PROGRESS_INTERVAL_MS) {
      this.lastEmit = now;
      this.send();
    }
    if (now - this.lastSave >= HEARTBEAT_MS) {
      this.lastSave = now;
      void this.heartbeat().catch((err: Error) => logger().warn({ err: err.message }, 'back-fill heartbeat failed'));
    }
  }

  saved(): void {
    this.lastSave = Date.now();
  }
}

/**
 * The CSV back-fill use case: one import run, from the first byte to the
 * summary. Rows are read as the file arrives, 500 at a time validated,
 * tokenised, stored as historical with their features and labels, and the
 * rejected ones written to the error report with their line and field. The
 * run is recorded at once (so progress can name it) and finished with its
 * counts; a whole-file problem (bad header, broken CSV, file too large,
 * upload cut off) ends it as failed with the rows before it kept.
 */
export async function importTransactionsCsv(d: ImportDeps, input: ImportInput): Promise<ImportOutcome> {
  const now = input.now ?? new Date();
  const id = await createImport(d.db, { userId: input.user.id, fileName: input.fileName, startedAt: now });
  const report = new ErrorReport(d.config.UPLOAD_DIR, id);
  const counts: BackfillCounts = { rowsRead: 0, accepted: 0, duplicate: 0, rejected: 0, labelsAdded: 0, bytesRead: 0 };
  let failure: ImportOutcome['failure'] = null;
  let finishedAt: Date | null = null;

  const event = (status: BackfillImport['status']): BackfillProgressEvent => ({
    id,
    fileName: input.fileName,
    status,
    counts: { ...counts, bytesRead: input.bytesRead() },
    startedAt: now.toISOString(),
    finishedAt: finishedAt?.toISOString() ?? null,
    error: failure ? { code: failure.code, message: failure.message } : null,
    errorReportUrl: report.fileName ? backfillErrorReportUrl(id) : null,
    uploadedBy: input.user,
    clientRef: input.clientRef,
  });
  const progress = new ProgressPump(
    () => d.emit(input.user.id, event('running')),
    () => saveProgress(d.db, id, { ...counts, bytesRead: input.bytesRead() }, report.fileName),
  );
  progress.tick(true);

  let pending: PendingRow[] = [];
  const store = async (rows: PendingRow[]) => {
    const valid = rows.filter((r): r is PendingRow & { item: HistoricalItem } => r.item !== null);
    const outcomes = await storeHistoricalBatch(
      d.db,
      d.velocity,
      valid.map((r) => r.item),
      { source: 'csv', labelSource: 'backfill', receivedAt: now, createdBy: input.user.id, labelExisting: true },
    );
    valid.forEach((r, i) => {
      const o = outcomes[i];
      if (o.status === 'accepted') counts.accepted += 1;
      else if (o.status === 'duplicate') counts.duplicate += 1;
      else r.rejected.push({ row: r.row, id: r.item.t.externalId, field: 'id', message: 'is already stored for a different card: the row was not imported' });
      if (o.labelAdded) counts.labelsAdded += 1;
    });
    const lines = rows.flatMap((r) => r.rejected);
    counts.rejected += rows.filter((r) => r.rejected.length > 0).length;
    await report.add(lines);
    await saveProgress(d.db, id, { ...counts, bytesRead: input.bytesRead() }, report.fileName);
    progress.saved();
    progress.tick();
  };
  // Chunks are stored one after another (velocity needs their order), while the next
  // chunk is read and validated: at most one chunk waits on the database.
  let storing: Promise<void> = Promise.resolve();
  const flush = async () => {
    await storing;
    const rows = pending;
    pending = [];
    storing = store(rows);
    // Awaited by the next flush; until then a failure must not count as unhandled.
    storing.catch(() => undefined);
  };
  const drain = async () => {
    await flush();
    await storing;
  };

  const parser = parse({
    bom: true,
    skip_empty_lines: true,
    // A row with the wrong number of cells is that row's problem, reported below, not the file's.
    relax_column_count: true,
    record_delimiter: ['\r\n', '\n', '\r'],
    max_record_size: MAX_RECORD_CHARS,
    info: true,
  });
  // Errors surface through the iteration below; this settles once the streams are done.
  const piping = pipeline(input.file, parser).catch((err: unknown) => err);

  try {
    let header: string[] | null = null;
    for await (const { record, info } of parser as AsyncIterable<{ record: string[]; info: { lines: number } }>) {
      if (record.every((c) => c.trim() === '')) continue;
      if (header === null) {
        header = readHeader(record);
        continue;
      }
      // info.lines is where the row ends; a quoted cell may span lines.
      const row = info.lines - record.reduce((n, c) => n + (c.match(/\n/g)?.length ?? 0), 0);
      counts.rowsRead += 1;
      pending.push(readRow(header, record, row, now, d.config.PAN_HMAC_KEY));
      if (pending.length >= CHUNK_ROWS) await flush();
      else progress.tick();
    }
    const streamError = await piping;
    if (streamError) throw streamError;
    if (header === null) throw fileProblem('empty_file', 'The file is empty: the first line must be the header row naming the columns.');
    await drain();
  } catch (err) {
    failure = failureOf(err);
    if (failure.status === 500) logger().error({ err, importId: id }, 'back-fill import failed');
    input.file.destroy();
    await piping;
    // Rows read before the file broke are kept: each was valid on its own.
    const kept = failure.status >= 500 ? storing.catch(() => undefined) : drain();
    await kept.catch((e: unknown) => {
      failure = failureOf(e);
      if (failure.status === 500) logger().error({ err: e, importId: id }, 'back-fill import failed');
    });
  }

  // A report the disk could not take is removed, and the run says so: a half report would list fewer rows than it counts.
  await report.close().catch((err: Error) => {
    if (!isStorageFull(err)) logger().warn({ err: err.message, importId: id }, 'error report did not close cleanly');
  });
  if (isStorageFull(report.error)) {
    failure = { ...STORAGE_FULL_FAILURE };
    logger().warn({ importId: id }, 'back-fill error report not written: the upload disk is full');
    await report.discard();
  }
  finishedAt = new Date();
  counts.bytesRead = input.bytesRead();
  await finishImport(d.db, id, { counts, errorReportFile: report.fileName, failure: failure && { code: failure.code, message: failure.message }, finishedAt });
  d.emit(input.user.id, event(failure ? 'failed' : 'completed'));
  const stored = await findImport(d.db, id);
  return { view: stored!.view, failure };
}

const toFailure = (p: UploadProblem) => ({ status: p.status, code: p.code, message: p.message });

/** What a run that stopped answers, from what stopped it: the file's fault (4xx), a full disk (507), a busy database (503), or ours (500). */
function failureOf(err: unknown): NonNullable<ImportOutcome['failure']> {
  if (err instanceof CsvError) return toFailure(csvProblem(err));
  if (err instanceof UploadProblem) return toFailure(err);
  if (isStorageFull(err)) return { ...STORAGE_FULL_FAILURE };
  if (err instanceof AppError && err.status === 503) return { ...BUSY_FAILURE };
  return { ...INTERNAL_FAILURE };
}

function readRow(header: string[], cells: string[], row: number, now: Date, panKey: string): PendingRow {
  if (cells.length !== header.length) {
    return {
      row,
      item: null,
      rejected: [{ row, id: null, field: '(row)', message: `has ${cells.length} cells but the header has ${header.length} columns` }],
    };
  }
  const record: Record<string, string> = Object.create(null);
  header.forEach((name, i) => (record[name] = cells[i]));
  const result = validateBackfillTransaction(nestCsvRecord(record), { now });
  if (!result.ok) {
    // The id is named only when it passed its own checks (which refuse an id holding the card number).
    const idCell = record.id?.trim() ?? '';
    const id = idCell && !result.issues.some((i: Issue) => i.path === 'id') ? idCell : null;
    return { row, item: null, rejected: result.issues.map((i) => ({ row, id, field: i.path, message: i.message })) };
  }
  const v = result.value;
  const t = normaliseTransaction(v, panKey);
  const label = v.label ? { label: v.label, fraudType: null, reportedAt: v.labelReportedAt ?? now } : null;
  return { row, item: { t, label }, rejected: [] };
}
