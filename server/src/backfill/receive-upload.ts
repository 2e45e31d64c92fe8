import { Transform, type Readable, type TransformCallback } from 'node:stream';
import type { Request } from 'express';
import busboy from 'busboy';
import {
  BACKFILL_CLIENT_REF_FIELD,
  BACKFILL_FILE_FIELD,
  BACKFILL_MAX_BYTES,
  BACKFILL_MAX_LABEL,
  CLIENT_REF_PATTERN,
} from '@shared/api/backfill';
import { AppError } from '../lib/app-error';
import { uploadDisplayName } from '../lib/upload-name';

/** A whole-file problem: the run stops and the client gets `status`. */
export class UploadProblem extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
  ) {
    super(message);
    this.name = 'UploadProblem';
  }
}

export interface CsvUpload {
  fileName: string;
  clientRef: string | null;
  /** The file's bytes as they arrive, counted and checked (see checkedBytes). */
  file: Readable;
}

// Browsers label .csv files inconsistently (Excel installs make it application/vnd.ms-excel,
// others send text/plain or nothing), so these are taken when the name ends in .csv.
const GENERIC_TYPES = new Set(['', 'application/octet-stream', 'application/vnd.ms-excel', 'text/plain', 'application/csv', 'text/x-csv', 'text/comma-separated-values']);
// Multipart framing around the file: headers of each part and the boundaries.
const FRAMING_ALLOWANCE = 64 * 1024;
const SNIFF_BYTES = 8192;

function refuseType(): AppError {
  return new AppError({
    status: 415,
    code: 'unsupported_file_type',
    message: 'Only CSV files can be imported: send a .csv file (text/csv) in the field "file".',
  });
}

/** Display name of the upload (see uploadDisplayName): shown and stored with the run, never a path. */
export function cleanFileName(raw: string | undefined): string {
  return uploadDisplayName(raw, 'upload.csv', 255);
}

function isCsv(fileName: string, mimeType: string): boolean {
  const type = mimeType.toLowerCase().split(';')[0].trim();
  if (type === 'text/csv') return true;
  return fileName.toLowerCase().endsWith('.csv') && GENERIC_TYPES.has(type);
}

/**
 * Counts the bytes that pass, refuses binary content (a NUL byte in the first
 * 8 KiB: text files have none), and stops at the size limit.
 */
class CheckedBytes extends Transform {
  bytes = 0;
  private sniffed = 0;

  constructor(private readonly onBytes: (total: number) => void) {
    super();
  }

  override _transform(chunk: Buffer, _enc: BufferEncoding, done: TransformCallback): void {
    if (this.sniffed < SNIFF_BYTES) {
      const head = chunk.subarray(0, SNIFF_BYTES - this.sniffed);
      this.sniffed += head.length;
      if (head.includes(0)) {
        done(new UploadProblem(415, 'not_csv', 'The file is not text (it contains NUL bytes): export it from the spreadsheet as CSV.'));
        return;
      }
    }
    this.bytes += chunk.length;
    this.onBytes(this.bytes);
    done(null, chunk);
  }
}

/**
 * Reads a multipart upload far enough to find the CSV file and hands its
 * stream on; nothing is buffered beyond what the parser downstream asks for.
 * Refuses (before any row is read) a request that is not multipart or whose
 * file is not CSV (415), one without a file (400), and one declared larger
 * than the limit (413). A file that turns out larger, or an upload cut off,
 * makes the stream fail with an UploadProblem.
 */
export function receiveCsvUpload(req: Request, onBytes: (total: number) => void): Promise<CsvUpload> {
  const declared = Number(req.headers['content-length'] ?? NaN);
  if (Number.isFinite(declared) && declared > BACKFILL_MAX_BYTES + FRAMING_ALLOWANCE) {
    return Promise.reject(new AppError({ status: 413, code: 'file_too_large', message: `The file is larger than ${BACKFILL_MAX_LABEL}: split it and upload the parts.` }));
  }
  let bb: busboy.Busboy;
  try {
    bb = busboy({
      headers: req.headers,
      limits: { fileSize: BACKFILL_MAX_BYTES, files: 1, fields: 4, parts: 6, fieldSize: 256 },
    });
  } catch {
    // busboy throws when the Content-Type is not multipart/form-data (or has no boundary).
    return Promise.reject(refuseType());
  }

  return new Promise<CsvUpload>((resolve, reject) => {
    let clientRef: string | null = null;
    let settled = false;
    let active: CheckedBytes | null = null;
    const fail = (err: Error) => {
      if (!settled) {
        settled = true;
        reject(err);
      } else if (active && !active.destroyed) {
        active.destroy(err);
      }
    };

    bb.on('field', (name, value) => {
      if (name === BACKFILL_CLIENT_REF_FIELD && CLIENT_REF_PATTERN.test(value)) clientRef = value;
    });
    bb.on('file', (name, stream, info) => {
      if (settled || name !== BACKFILL_FILE_FIELD) {
        stream.resume();
        if (!settled) fail(AppError.badRequest(`Send the CSV file in the multipart field "${BACKFILL_FILE_FIELD}".`));
        return;
      }
      const fileName = cleanFileName(info.filename);
      if (!isCsv(fileName, info.mimeType ?? '')) {
        stream.resume();
        fail(refuseType());
        return;
      }
      const checked = new CheckedBytes(onBytes);
      active = checked;
      stream.on('limit', () => {
        checked.destroy(new UploadProblem(413, 'file_too_large', `The file is larger than ${BACKFILL_MAX_LABEL}: the rows before the limit were imported; split the rest and upload it.`));
      });
      stream.on('error', (err: Error) => checked.destroy(err));
      // Whatever stops the import early, the rest of the file is read and dropped so the request can finish.
      checked.on('close', () => {
        stream.unpipe(checked);
        stream.resume();
      });
      // The consumer attaches after the run is recorded; until then an early failure waits on the stream, not the process.
      checked.on('error', () => undefined);
      stream.pipe(checked);
      settled = true;
      resolve({ fileName, clientRef, file: checked });
    });
    bb.on('error', () => fail(new UploadProblem(400, 'upload_aborted', 'The upload ended before the whole file arrived.')));
    bb.on('close', () => {
      if (!settled) fail(AppError.badRequest(`The upload has no file: send the CSV file in the multipart field "${BACKFILL_FILE_FIELD}".`));
    });
    // A client that goes away mid-file: busboy sees no end, so the stream is failed here.
    req.on('close', () => {
      if (!req.complete) fail(new UploadProblem(400, 'upload_aborted', 'The upload ended before the whole file arrived.'));
    });
    req.pipe(bb);
  });
}
