import { createWriteStream, type WriteStream } from 'node:fs';
import { mkdir } from 'node:fs/promises';
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
 */
export class ErrorReport {
  private csv: Stringifier | null = null;
  private out: WriteStream | null = null;
  private lines = 0;
  private truncated = false;

  constructor(
    private readonly uploadDir: string,
    private readonly importId: number,
  ) {}

  /** The file name, once the report exists. */
  get fileName(): string | null {
    return this.csv ? reportFileName(this.importId) : null;
  }

  async add(lines: readonly ReportLine[]): Promise<void> {
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
      if (!ok) await new Promise((resolve) => csv.once('drain', resolve));
    }
  }

  async close(): Promise<void> {
    if (!this.csv || !this.out) return;
    this.csv.end();
    await finished(this.out);
  }

  private async open(): Promise<Stringifier> {
    if (this.csv) return this.csv;
    const dir = backfillDir(this.uploadDir);
    await mkdir(dir, { recursive: true, mode: 0o700 });
    this.out = createWriteStream(path.join(dir, reportFileName(this.importId)), { mode: 0o600 });
    this.csv = stringify({ bom: true, header: true, columns: [...ERROR_REPORT_COLUMNS], quoted: true });
    this.csv.pipe(this.out);
    return this.csv;
  }
}
