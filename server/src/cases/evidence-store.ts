import { createHash, randomUUID } from 'node:crypto';
import { createWriteStream } from 'node:fs';
import { mkdir, open, rm } from 'node:fs/promises';
import path from 'node:path';
import { pipeline } from 'node:stream/promises';
import { Transform } from 'node:stream';
import type { Request } from 'express';
import busboy from 'busboy';
import { fileTypeFromBuffer } from 'file-type';
import { AppError } from '../lib/app-error';
import { EVIDENCE_MAX_BYTES, EVIDENCE_TYPES } from '@shared/api/cases';

export interface StoredFile {
  fileName: string;
  contentType: (typeof EVIDENCE_TYPES)[number];
  size: number;
  sha256: string;
  storageKey: string;
}

/** A display name only: never used to build a path. Control characters and path parts removed. */
export function safeDisplayName(name: string): string {
  const base = name.split(/[\\/]/).pop() ?? 'file';
  // eslint-disable-next-line no-control-regex
  const clean = base.replace(/[\u0000-\u001f\u007f]/g, '').trim().slice(0, 200);
  return clean || 'file';
}

/** The first bytes of a file, enough for magic-number detection. */
async function head(file: string, bytes = 4_100): Promise<Uint8Array> {
  const fh = await open(file, 'r');
  try {
    const buf = Buffer.alloc(bytes);
    const { bytesRead } = await fh.read(buf, 0, bytes, 0);
    return new Uint8Array(buf.subarray(0, bytesRead));
  } finally {
    await fh.close();
  }
}

async function looksLikeCsv(file: string): Promise<boolean> {
  const fh = await open(file, 'r');
  try {
    const buf = Buffer.alloc(65_536);
    const { bytesRead } = await fh.read(buf, 0, buf.length, 0);
    const head = buf.subarray(0, bytesRead);
    if (head.includes(0)) return false;
    try {
      new TextDecoder('utf-8', { fatal: true }).decode(head.subarray(0, Math.max(0, bytesRead - 4)));
    } catch {
      return false;
    }
    return true;
  } finally {
    await fh.close();
  }
}

/**
 * Streams one multipart file (field `file`) to the upload folder, outside the
 * web root, under a random name; checks size while streaming and type by
 * content (magic bytes for PNG, JPEG and PDF; UTF-8 text without NUL bytes for
 * CSV), whatever the client claimed. A full disk answers 507 and leaves no
 * partial file.
 */
export function storeEvidence(req: Request, uploadDir: string): Promise<StoredFile> {
  return new Promise((resolve, reject) => {
    let bb: busboy.Busboy;
    try {
      bb = busboy({ headers: req.headers, limits: { files: 1, fileSize: EVIDENCE_MAX_BYTES, fields: 5 } });
    } catch {
      reject(new AppError({ status: 415, code: 'unsupported_media_type', message: 'Send the file as multipart/form-data.' }));
      return;
    }
    let handled = false;
    bb.on('file', (field, stream, info) => {
      if (field !== 'file' || handled) {
        stream.resume();
        return;
      }
      handled = true;
      const key = path.join('evidence', new Date().toISOString().slice(0, 7), `${randomUUID()}.bin`);
      const full = path.join(uploadDir, key);
      const hash = createHash('sha256');
      let size = 0;
      let truncated = false;
      stream.on('limit', () => (truncated = true));
      const meter = new Transform({
        transform(chunk: Buffer, _enc, cb) {
          size += chunk.length;
          hash.update(chunk);
          cb(null, chunk);
        },
      });
      (async () => {
        await mkdir(path.dirname(full), { recursive: true });
        await pipeline(stream, meter, createWriteStream(full, { flags: 'wx', mode: 0o600 }));
        if (truncated) throw new AppError({ status: 413, code: 'payload_too_large', message: `Evidence files may be at most ${EVIDENCE_MAX_BYTES / 1024 / 1024} MB.` });
        if (size === 0) throw AppError.badRequest('The file is empty.', [{ path: 'file', message: 'Empty file' }]);
        const detected = await fileTypeFromBuffer(await head(full));
        let contentType: StoredFile['contentType'] | null = null;
        if (detected && (EVIDENCE_TYPES as readonly string[]).includes(detected.mime)) contentType = detected.mime as StoredFile['contentType'];
        else if (!detected && (info.mimeType === 'text/csv' || /\.csv$/i.test(info.filename ?? '')) && (await looksLikeCsv(full))) contentType = 'text/csv';
        if (!contentType) {
          throw new AppError({ status: 415, code: 'unsupported_media_type', message: 'Evidence must be a PNG or JPEG image, a PDF or a CSV file.' });
        }
        return { fileName: safeDisplayName(info.filename || 'file'), contentType, size, sha256: hash.digest('hex'), storageKey: key };
      })().then(resolve, async (err: NodeJS.ErrnoException) => {
        await rm(full, { force: true }).catch(() => undefined);
        if (err?.code === 'ENOSPC') reject(new AppError({ status: 507, code: 'storage_full', message: 'The evidence store is full; nothing was saved. Tell an admin.' }));
        else reject(err);
      });
    });
    bb.on('error', (err) => reject(err instanceof AppError ? err : AppError.badRequest('The upload could not be read.')));
    bb.on('close', () => {
      if (!handled) reject(AppError.badRequest('Attach the file in a field named "file".', [{ path: 'file', message: 'Missing' }]));
    });
    req.pipe(bb);
  });
}
