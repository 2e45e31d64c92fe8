import { createReadStream } from 'node:fs';
import { access } from 'node:fs/promises';
import { pipeline } from 'node:stream/promises';
import type { Response } from 'express';
import { AppError } from './app-error';

/**
 * Headers of every file the server hands out (exports, error reports, evidence): an attachment
 * under the given name, the declared type and no sniffing past it, no caching, and a CSP that
 * sandboxes the file should a browser render it anyway (OWASP ASVS 4.0 V12.5.2, V14.4.2; the
 * requirement numbers are from memory).
 */
export function setDownloadHeaders(res: Response, fileName: string, contentType: string): void {
  res.set('Content-Type', contentType);
  res.set('X-Content-Type-Options', 'nosniff');
  res.set('Content-Security-Policy', "default-src 'none'; sandbox");
  res.set('Cache-Control', 'no-store');
  res.attachment(fileName);
}

/** Sends an import's per-row error report (a CSV file the import wrote), or 404 when it has none. */
export async function sendErrorReport(res: Response, file: string | null, fileName: string): Promise<void> {
  if (!file || !(await access(file).then(() => true, () => false))) throw AppError.notFound('This import has no error report.');
  setDownloadHeaders(res, fileName, 'text/csv; charset=utf-8');
  await pipeline(createReadStream(file), res);
}
