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
import { uploadDisplayName } from '../lib/upload-name';
import { EVIDENCE_MAX_BYTES, EVIDENCE_TYPES } from '@shared/api/cases';

export interface StoredFile {
  fileName: string;
  contentType: (typeof EVIDENCE_TYPES)[number];
  size: number;
  sha256: string;
  storageKey: string;
}

/** The extensions a file's name may end in, by the type its content shows. */
const EXTENSIONS: Record<StoredFile['contentType'], readonly string[]> = {
  'image/png': ['.png'],
  'image/jpeg': ['.jpg', '.jpeg'],
  'application/pdf': ['.pdf'],
  'text/csv': ['.csv'],
};

/**
 * The display name of evidence of type `type` (never used to build a path),
 * ending in an extension of that type: one is added to a name without any, and
 * a name ending in another is refused (null), since a PNG saved as page.html
 * opens as a web page (OWASP File Upload Cheat Sheet, "Extension Validation").
 */
export function evidenceName(raw: string | undefined, type: StoredFile['contentType']): string | null {
  const name = uploadDisplayName(raw, 'file');
  const ext = path.extname(name).toLowerCase();
  if (EXTENSIONS[type].includes(ext)) return name;
  return ext === '' ? uploadDisplayName(`${name}${EXTENSIONS[type][0]}`, 'file') : null;
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
        const fileName = evidenceName(info.filename, contentType);
        if (!fileName) {
          throw new AppError({ status: 415, code: 'unsupported_media_type', message: `The file's name does not match its content (${contentType}): rename it to end in ${EXTENSIONS[contentType].join(' or ')}.` });
        }
        return { fileName, contentType, size, sha256: hash.digest('hex'), storageKey: key };
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
