import { createWriteStream, type WriteStream } from 'node:fs';
import { mkdir, rm } from 'node:fs/promises';
import path from 'node:path';
import { finished } from 'node:stream/promises';
import { stringify, type Stringifier } from 'csv-stringify';
import { ERROR_REPORT_COLUMNS } from '@shared/api/backfill';
import { scrubDigits } from '../lib/logger';
import { neutraliseCell } from '../audit/csv-export';

/** Beyond this many lines the report stops listing (the counts still say how many rows were rejected). */
export const MAX_REPORT_LINES = 100_000;

/**
 * A cell a spreadsheet will show as text (neutraliseCell: the audit export's
 * rule, OWASP "CSV Injection"). Runs of 12 or more digits are removed as
 * well, so no cell can carry a card number.
 */
export function safeCell(value: string): string {
  return neutraliseCell(scrubDigits(value));
}

export interface ReportLine {
  row: number;
  id: string | null;
  field: string;
  message: string;
}

/**
 * The disk under the upload folder is full (ENOSPC) or the quota is used up
 * (EDQUOT): the server cannot store what the request needs, which HTTP says
 * with 507 Insufficient Storage (RFC 4918 §11.5), not with a 500.
 */
export function isStorageFull(err: unknown): boolean {
  const code = (err as NodeJS.ErrnoException | null)?.code;
  return code === 'ENOSPC' || code === 'EDQUOT';
}

/** How an import that could not write its report answers: 507 and what was kept, in the import's own words. */
export function storageFullFailure(kept: string): { status: number; code: string; message: string } {
  return {
    status: 507,
    code: 'storage_full',
    message:
      `The disk that keeps import error reports is full, so the import stopped: ${kept} before that point were imported and are in the counts; the rejected rows could not be listed. ` +
      'Ask an admin to free space, then upload the same file again (what was imported counts as duplicates).',
  };
}

export const backfillDir = (uploadDir: string) => path.join(uploadDir, 'backfill');
export const reportFileName = (importId: number) => `import-${importId}-errors.csv`;

/** Resolves a stored report name inside the back-fill folder; anything that is not a plain file name of ours is refused. */
export function reportPath(uploadDir: string, fileName: string): string | null {
  if (!/^import-\d+-errors\.csv$/.test(fileName)) return null;
  return path.join(backfillDir(uploadDir), fileName);
}

/**
 * The per-row error report of one import, written as rows are rejected and
 * only created on the first one. Cells are quoted and neutralised; the file
 * starts with a byte order mark so spreadsheet programs read it as UTF-8.
 *
 * A write that fails (a full disk) is kept, not thrown at the process: the
 * next `add` or `close` rejects with it, and `discard` removes the partial
 * file, so an import row never names a report that lists less than it says.
 */
export class ErrorReport {
  private csv: Stringifier | null = null;
  private out: WriteStream | null = null;
  private lines = 0;
  private truncated = false;
  private failure: Error | null = null;

  constructor(
    private readonly uploadDir: string,
    private readonly importId: number,
  ) {}

  /** The file name, once the report exists. */
  get fileName(): string | null {
    return this.csv ? reportFileName(this.importId) : null;
  }

  /** The first write error, if one happened (e.g. ENOSPC). */
  get error(): Error | null {
    return this.failure;
  }

  async add(lines: readonly ReportLine[]): Promise<void> {
    if (this.failure) throw this.failure;
    if (lines.length === 0 || this.truncated) return;
    const csv = await this.open();
    for (const l of lines) {
      if (this.lines >= MAX_REPORT_LINES) {
        this.truncated = true;
        csv.write(['', '', '(report)', `only the first ${MAX_REPORT_LINES} problems are listed; the import counts give the total`]);
        break;
      }
      this.lines += 1;
      const ok = csv.write([String(l.row), safeCell(l.id ?? ''), safeCell(l.field), safeCell(l.message)]);
      if (!ok) await this.drained(csv);
      if (this.failure) throw this.failure;
    }
  }

  async close(): Promise<void> {
    if (!this.csv || !this.out) return;
    if (this.failure) throw this.failure;
    this.csv.end();
    await finished(this.out);
    if (this.failure) throw this.failure;
  }

  /** Removes the report (after a failed write: half a report would list fewer rows than the import counts). */
  async discard(): Promise<void> {
    if (!this.csv || !this.out) return;
    const file = this.out.path as string;
    this.csv.unpipe(this.out);
    this.csv.destroy();
    this.out.destroy();
    await finished(this.out).catch(() => undefined);
    await rm(file, { force: true });
    this.csv = null;
    this.out = null;
  }

  /** Waits for the stringifier to drain, or for the file to fail (a failed file never drains it). */
  private drained(csv: Stringifier): Promise<void> {
    const out = this.out!;
    return new Promise((resolve) => {
      const done = () => {
        csv.off('drain', done);
        out.off('error', done);
        resolve();
      };
      csv.once('drain', done);
      out.once('error', done);
    });
  }

  private async open(): Promise<Stringifier> {
    if (this.csv) return this.csv;
    const dir = backfillDir(this.uploadDir);
    await mkdir(dir, { recursive: true, mode: 0o700 });
    this.out = createWriteStream(path.join(dir, reportFileName(this.importId)), { mode: 0o600 });
    // Without a listener of its own, a write error would be re-thrown by pipe() as an uncaught exception.
    this.out.on('error', (err) => void (this.failure ??= err));
    this.csv = stringify({ bom: true, header: true, columns: [...ERROR_REPORT_COLUMNS], quoted: true });
    this.csv.pipe(this.out);
    return this.csv;
  }
}
