import { mkdtemp, readdir, readFile, stat } from 'node:fs/promises';
import http from 'node:http';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { QueryTypes } from 'sequelize';
import { startTestServer, type TestServer } from '../helpers/test-server';
import { casePipeline, sessionsPerRole, type Session } from './helpers';

/**
 * Uploads: evidence on a case, the back-fill CSV and the late-labels CSV
 * (OWASP ASVS 4.0 V12.1-V12.5; OWASP File Upload Cheat Sheet). File names
 * never become paths, content decides the type, limits hold, and what is
 * stored sits in the upload folder under a name the server made.
 */
let ts: TestServer;
let parent: string;
let uploadDir: string;
let pipeline: Awaited<ReturnType<typeof casePipeline>>;
let session: ReturnType<typeof sessionsPerRole>;
let caseId: number;

beforeAll(async () => {
  // The upload folder inside a fresh folder of its own: anything written outside it shows up in the parent.
  parent = await mkdtemp(path.join(tmpdir(), 'edgecase-uploads-'));
  uploadDir = path.join(parent, 'uploads');
  ts = await startTestServer({ UPLOAD_DIR: uploadDir });
  session = sessionsPerRole(ts);
  pipeline = await casePipeline(ts);
  caseId = await pipeline.newCase();
  const inv = await session('investigator');
  await inv.agent.post(`/api/cases/${caseId}/claim`).set('X-CSRF-Token', inv.csrf).expect(200);
});
afterAll(async () => {
  await pipeline?.close();
  await ts?.close();
});

// ─── multipart by hand, so file names and bytes are exactly what a hostile client sends ───

interface Part {
  field?: string;
  /** The quoted filename parameter, written byte for byte. */
  filename?: string;
  /** RFC 8187 extended value (filename*=UTF-8''...), for bytes a quoted string cannot carry. */
  filenameStar?: string;
  type?: string;
  data: Buffer | string;
}

function multipart(parts: Part[]): { body: Buffer; type: string } {
  const boundary = `----edgecase-security-${Math.random().toString(16).slice(2)}`;
  const chunks: Buffer[] = [];
  for (const p of parts) {
    let disposition = `form-data; name="${p.field ?? 'file'}"`;
    if (p.filename !== undefined) disposition += `; filename="${p.filename}"`;
    if (p.filenameStar !== undefined) disposition += `; filename*=UTF-8''${p.filenameStar}`;
    chunks.push(Buffer.from(`--${boundary}\r\nContent-Disposition: ${disposition}\r\nContent-Type: ${p.type ?? 'application/octet-stream'}\r\n\r\n`, 'latin1'));
    chunks.push(Buffer.isBuffer(p.data) ? p.data : Buffer.from(p.data));
    chunks.push(Buffer.from('\r\n'));
  }
  chunks.push(Buffer.from(`--${boundary}--\r\n`));
  return { body: Buffer.concat(chunks), type: `multipart/form-data; boundary=${boundary}` };
}

async function upload(who: Session, url: string, parts: Part[]) {
  const { body, type } = multipart(parts);
  return who.agent.post(url).set('X-CSRF-Token', who.csrf).set('Content-Type', type).send(body);
}

// ─── file contents ───

// PNG signature and IHDR chunk (RFC 2083 / ISO/IEC 15948: 89 50 4E 47 0D 0A 1A 0A).
const PNG = Buffer.concat([Buffer.from('89504e470d0a1a0a0000000d49484452000000010000000108060000001f15c489', 'hex'), Buffer.alloc(64)]);
// A PDF header (ISO 32000-1 section 7.5.2: %PDF-1.7) and a minimal body.
const PDF = Buffer.from('%PDF-1.7\n1 0 obj <<>> endobj\ntrailer <<>>\n%%EOF\n');
// MZ: the DOS/PE executable header, with the NUL bytes that follow it in every real one.
const EXE = Buffer.concat([Buffer.from('4d5a90000300000004000000ffff0000', 'hex'), Buffer.alloc(64)]);
// A ZIP local file header (PKWARE APPNOTE 4.3.7: PK\x03\x04), as an .xlsx or a zip bomb starts.
const ZIP = Buffer.concat([Buffer.from('504b0304140000000800', 'hex'), Buffer.alloc(40)]);
const HTML = '<!doctype html><html><body><script>alert(document.cookie)</script></body></html>';
const SVG = '<svg xmlns="http://www.w3.org/2000/svg"><script>alert(document.cookie)</script></svg>';
const BINARY = Buffer.from(Array.from({ length: 512 }, (_, i) => (i * 37) % 256));

const evidenceUrl = () => `/api/cases/${caseId}/evidence`;

async function evidenceRows() {
  return ts.server.db.sequelize.query<{ id: number; file_name: string; content_type: string; storage_key: string; size: number }>(
    'SELECT id, file_name, content_type, storage_key, size FROM case_evidence WHERE case_id = ? ORDER BY id',
    { replacements: [caseId], type: QueryTypes.SELECT },
  );
}

/** Every file below `dir`, as paths relative to it. */
async function filesBelow(dir: string): Promise<string[]> {
  const out: string[] = [];
  for (const e of await readdir(dir, { withFileTypes: true, recursive: true })) {
    if (e.isFile()) out.push(path.relative(dir, path.join(e.parentPath, e.name)));
  }
  return out.sort();
}

/** A display name is text only: no path separator, no control or bidirectional-override character, not just dots. */
function isInertName(name: string): boolean {
  // eslint-disable-next-line no-control-regex
  return !/[\\/\u0000-\u001f\u007f\u202a-\u202e\u2066-\u2069]/.test(name) && !/^\.*$/.test(name) && name.length <= 255;
}

describe('evidence uploads', () => {
  const hostileNames: [string, Part][] = [
    ['a relative path up', { filename: '../../../etc/receipt.png', data: PNG, type: 'image/png' }],
    ['an absolute path', { filename: '/etc/passwd.png', data: PNG, type: 'image/png' }],
    ['Windows backslashes', { filenameStar: '..%5C..%5CWindows%5Csystem32%5Creceipt.png', data: PNG, type: 'image/png' }],
    ['a NUL byte', { filenameStar: 'rece%00ipt.png', data: PNG, type: 'image/png' }],
    ['control characters and a bidirectional override', { filenameStar: 'inv%0D%0Aoice%E2%80%AEgnp.png', data: PNG, type: 'image/png' }],
    ['only dots', { filename: '..', data: PNG, type: 'image/png' }],
    ['1,000 characters', { filename: `${'a'.repeat(1000)}.png`, data: PNG, type: 'image/png' }],
    ['unicode', { filenameStar: encodeURIComponent('квитанция 收据 🧾.png'), data: PNG, type: 'image/png' }],
  ];

  it('stores every hostile name as inert text, the file inside the upload folder under a generated name, nothing outside it', async () => {
    const inv = await session('investigator');
    for (const [what, part] of hostileNames) {
      const res = await upload(inv, evidenceUrl(), [part]);
      expect(res.status, what).toBe(201);
      const name = res.body.evidence.fileName as string;
      expect(isInertName(name), `${what}: ${JSON.stringify(name)}`).toBe(true);
      expect(name.toLowerCase().endsWith('.png'), `${what}: ${JSON.stringify(name)}`).toBe(true);
      expect(res.body.evidence.contentType).toBe('image/png');
    }
    const named = await evidenceRows();
    expect(named.at(-1)!.file_name).toBe('квитанция 收据 🧾.png');
    expect(named.find((r) => r.file_name.startsWith('aaa'))!.file_name.length).toBeLessThanOrEqual(200);

    const root = path.resolve(uploadDir);
    for (const row of named) {
      const full = path.resolve(root, row.storage_key);
      expect(full.startsWith(root + path.sep), row.storage_key).toBe(true);
      expect(path.basename(full)).toMatch(/^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}\.bin$/);
      expect(Buffer.compare(await readFile(full), PNG)).toBe(0);
      // Readable by the server's user only (OWASP File Upload Cheat Sheet: restrict file permissions).
      expect((await stat(full)).mode & 0o077).toBe(0);
    }
    // Nothing landed anywhere else: every file under the parent folder is one of those rows.
    expect(await filesBelow(parent)).toEqual(named.map((r) => path.join('uploads', r.storage_key)).sort());
  });

  it('decides the type by content: refuses an executable, HTML or SVG with script renamed .png, a PDF named .png, a ZIP named .csv, a binary CSV', async () => {
    const inv = await session('investigator');
    const before = (await evidenceRows()).length;
    const filesBefore = await filesBelow(parent);
    for (const [what, part] of [
      ['an executable named .png', { filename: 'photo.png', type: 'image/png', data: EXE }],
      ['HTML named .png', { filename: 'photo.png', type: 'image/png', data: HTML }],
      ['HTML as text/html', { filename: 'page.html', type: 'text/html', data: HTML }],
      ['SVG with a script', { filename: 'drawing.svg', type: 'image/svg+xml', data: SVG }],
      ['SVG with a script named .png', { filename: 'drawing.png', type: 'image/png', data: SVG }],
      ['a PDF claimed as PNG', { filename: 'statement.png', type: 'image/png', data: PDF }],
      ['a PNG named .html', { filename: 'page.html', type: 'text/html', data: PNG }],
      ['a PNG named .png, NUL, .html (the name ends .html once the NUL is gone)', { filenameStar: 'page.png%00.html', type: 'image/png', data: PNG }],
      ['a ZIP named .csv', { filename: 'rows.csv', type: 'text/csv', data: ZIP }],
      ['a binary file named .csv', { filename: 'rows.csv', type: 'text/csv', data: BINARY }],
    ] as [string, Part][]) {
      const res = await upload(inv, evidenceUrl(), [part]);
      expect(res.status, what).toBe(415);
      expect(res.body.error.code, what).toBe('unsupported_media_type');
    }
    expect((await evidenceRows()).length).toBe(before);
    // A refused file leaves nothing on disk.
    expect(await filesBelow(parent)).toEqual(filesBefore);
  });

  it('refuses an empty file (400) and one over 10 MB (413), keeps one file of a request with several, and leaves no partial file', async () => {
    const inv = await session('investigator');
    const before = (await evidenceRows()).length;
    const filesBefore = await filesBelow(parent);
    const empty = await upload(inv, evidenceUrl(), [{ filename: 'empty.png', type: 'image/png', data: Buffer.alloc(0) }]);
    expect(empty.status).toBe(400);
    const big = await upload(inv, evidenceUrl(), [{ filename: 'big.png', type: 'image/png', data: Buffer.concat([PNG, Buffer.alloc(10 * 1024 * 1024)]) }]);
    expect(big.status).toBe(413);
    expect(big.body.error.code).toBe('payload_too_large');
    expect((await evidenceRows()).length).toBe(before);
    expect(await filesBelow(parent)).toEqual(filesBefore);

    const several = await upload(inv, evidenceUrl(), [
      { filename: 'first.png', type: 'image/png', data: PNG },
      { filename: 'second.pdf', type: 'application/pdf', data: PDF },
      { filename: 'third.exe', type: 'application/octet-stream', data: EXE },
    ]);
    expect(several.status).toBe(201);
    const rows = await evidenceRows();
    expect(rows.length).toBe(before + 1);
    expect(rows.at(-1)!.file_name).toBe('first.png');
    expect((await filesBelow(parent)).length).toBe(filesBefore.length + 1);
  });

  it('serves a download as an attachment with nosniff and a sandboxing CSP (OWASP ASVS 4.0 V12.5.2, V14.4.2)', async () => {
    const inv = await session('investigator');
    const up = await upload(inv, evidenceUrl(), [{ filenameStar: encodeURIComponent('"><script>x</script>.pdf'), type: 'application/pdf', data: PDF }]);
    expect(up.status).toBe(201);
    const down = await inv.agent.get(`${evidenceUrl()}/${up.body.evidence.id}`).buffer(true).parse((res, cb) => {
      const chunks: Buffer[] = [];
      res.on('data', (c: Buffer) => chunks.push(c));
      res.on('end', () => cb(null, Buffer.concat(chunks)));
    });
    expect(down.status).toBe(200);
    expect(down.headers['content-type']).toMatch(/^application\/pdf/);
    expect(down.headers['content-disposition']).toMatch(/^attachment;/);
    // The hostile name stays inside the quoted parameter (RFC 6266 section 4.1: quoted-string, inner quotes escaped).
    expect(down.headers['content-disposition']).toMatch(/^attachment; filename="(?:[^"\\]|\\.)*"(?:; filename\*=UTF-8''[^\s;]+)?$/);
    expect(down.headers['x-content-type-options']).toBe('nosniff');
    const csp = String(down.headers['content-security-policy']);
    expect(csp).toMatch(/default-src 'none'/);
    expect(csp).toMatch(/\bsandbox\b/);
    expect(Buffer.compare(down.body as Buffer, PDF)).toBe(0);
  });
});

// ─── the two CSV uploads share the same receiver (server/src/backfill/receive-upload.ts) ───

const CSV_UPLOADS = [
  { what: 'back-fill', url: '/api/backfill/transactions', header: 'id,occurredAt,amount,currency,card.number,card.cardholderId,merchant.id,merchant.name,merchant.mcc,merchant.country,cardPresent' },
  { what: 'late labels', url: '/api/labels/imports', header: 'transactionId,reportedAt,fraudType' },
] as const;

describe.each(CSV_UPLOADS)('$what CSV uploads', ({ url, header }) => {
  it('keeps hostile file names as inert text and writes nothing but its own reports to disk', async () => {
    const ds = await session('data_scientist');
    const filesBefore = await filesBelow(parent);
    const names: string[] = [];
    for (const part of [
      { filename: '../../../etc/cron.d/rows.csv' },
      { filename: '/var/tmp/rows.csv' },
      { filenameStar: '..%5C..%5Crows.csv' },
      { filenameStar: 'rows%00.csv' },
      { filenameStar: 'ro%E2%80%AEvsc.ws%0A.csv' },
      { filename: `${'b'.repeat(1000)}.csv` },
      { filenameStar: encodeURIComponent('выписка 账单.csv') },
    ] as Partial<Part>[]) {
      const res = await upload(ds, url, [{ ...part, type: 'text/csv', data: `${header}\n` }]);
      expect(res.status, JSON.stringify(part)).toBe(200);
      names.push(res.body.import.fileName as string);
    }
    for (const name of names) expect(isInertName(name), JSON.stringify(name)).toBe(true);
    expect(names.at(-1)).toBe('выписка 账单.csv');
    // The CSV itself is streamed into the database, never kept: no file appeared.
    expect(await filesBelow(parent)).toEqual(filesBefore);
  });

  it('refuses what is not CSV text (415), an empty file (400) and one declared over 200 MB (413) without reading it', async () => {
    const ds = await session('data_scientist');
    for (const [what, part, status] of [
      ['an executable named .csv', { filename: 'rows.csv', type: 'text/csv', data: EXE }, 415],
      ['a ZIP named .csv', { filename: 'rows.csv', type: 'text/csv', data: ZIP }, 415],
      ['a binary file named .csv', { filename: 'rows.csv', type: 'text/csv', data: BINARY }, 415],
      ['a PNG named .png', { filename: 'rows.png', type: 'image/png', data: PNG }, 415],
      ['HTML as text/html', { filename: 'rows.html', type: 'text/html', data: HTML }, 415],
      ['HTML named .csv (text, but no header row)', { filename: 'rows.csv', type: 'text/csv', data: HTML }, 400],
      ['an empty file', { filename: 'rows.csv', type: 'text/csv', data: '' }, 400],
    ] as [string, Part, number][]) {
      const res = await upload(ds, url, [part]);
      expect(res.status, what).toBe(status);
      expect(res.body.error?.code, what).toEqual(expect.any(String));
      if (res.body.import) expect(res.body.import.counts.rowsRead, what).toBe(0);
    }
    const declared = await declaredTooLarge(ds, url);
    expect(declared.status).toBe(413);
    expect(declared.body).toMatch(/file_too_large/);
  });

  it('reads one file of a request with several', async () => {
    const ds = await session('data_scientist');
    const res = await upload(ds, url, [
      { filename: 'first.csv', type: 'text/csv', data: `${header}\n` },
      { filename: 'second.csv', type: 'text/csv', data: `${header}\n` },
    ]);
    expect(res.status).toBe(200);
    expect(res.body.import.fileName).toBe('first.csv');
  });
});

/** A request that declares 250 MB and sends a few bytes: the answer must come before the body does. */
function declaredTooLarge(who: Session, url: string): Promise<{ status: number; body: string }> {
  const cookie = (who.agent as unknown as { jar: { getCookies(o: object): { toValueString(): string }[] } }).jar
    .getCookies({ domain: '127.0.0.1', path: '/', secure: false, script: false })
    .map((c) => c.toValueString())
    .join('; ');
  const { port } = ts.server.http.address() as { port: number };
  return new Promise((resolve, reject) => {
    const req = http.request({
      host: '127.0.0.1',
      port,
      path: url,
      method: 'POST',
      headers: { 'Content-Type': 'multipart/form-data; boundary=x', 'Content-Length': String(250 * 1000 * 1000), Cookie: cookie, 'X-CSRF-Token': who.csrf },
    });
    req.on('response', (res) => {
      let body = '';
      res.on('data', (c: Buffer) => (body += c.toString()));
      res.on('end', () => {
        req.destroy();
        resolve({ status: res.statusCode ?? 0, body });
      });
      res.on('error', reject);
    });
    req.on('error', reject);
    req.write('--x\r\nContent-Disposition: form-data; name="file"; filename="big.csv"\r\nContent-Type: text/csv\r\n\r\nid\n');
  });
}
