import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { QueryTypes } from 'sequelize';
import { startTestServer, type TestServer } from '../helpers/test-server';
import { casePipeline, cspDirectives, fakeClientDist, scriptSources, sessionsPerRole } from './helpers';

/**
 * HTML in notes: the API keeps a note as the text that was typed and answers
 * it as JSON (never HTML), the client renders it as text (tests/client/
 * notes-markup.test.tsx), and the page's CSP would refuse an inline script
 * even if markup got through (OWASP ASVS 4.0 V5.3.3 output encoding, V14.4.3 CSP).
 */
const MARKUP = ['<img src=x onerror=alert(1)>', '<script>alert(document.cookie)</script>', '"><svg onload=alert(1)>', '<a href="javascript:alert(1)">call back</a> &amp; &lt;b&gt;'];

let ts: TestServer;
let pipeline: Awaited<ReturnType<typeof casePipeline>>;
let session: ReturnType<typeof sessionsPerRole>;
let caseId: number;

beforeAll(async () => {
  ts = await startTestServer({ CLIENT_DIST: await fakeClientDist() });
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

describe('HTML in notes', () => {
  it('stores and returns the text verbatim, as JSON that a browser will not sniff into HTML', async () => {
    const inv = await session('investigator');
    for (const text of MARKUP) {
      const res = await inv.agent.post(`/api/cases/${caseId}/notes`).set('X-CSRF-Token', inv.csrf).send({ text });
      expect(res.status).toBe(201);
      expect(res.headers['content-type']).toMatch(/^application\/json; charset=utf-8$/);
      expect(res.headers['x-content-type-options']).toBe('nosniff');
      expect(res.body.note.text).toBe(text);
    }
    const stored = await ts.server.db.sequelize.query<{ text: string }>('SELECT text FROM case_notes WHERE case_id = ? ORDER BY id', {
      replacements: [caseId],
      type: QueryTypes.SELECT,
    });
    expect(stored.map((r) => r.text)).toEqual(MARKUP);
    const file = await inv.agent.get(`/api/cases/${caseId}`).expect(200);
    expect(file.headers['content-type']).toMatch(/^application\/json/);
    const texts = (file.body.notes as { text: string }[]).map((n) => n.text);
    for (const text of MARKUP) expect(texts).toContain(text);
  });

  it('serves the page under a CSP that refuses inline script and inline event handlers (CSP Level 3)', async () => {
    const shell = await request(ts.server.http).get(`/cases/${caseId}`).expect(200);
    const csp = cspDirectives(shell.headers['content-security-policy']);
    const scripts = scriptSources(csp)!;
    expect(scripts).toEqual(["'self'"]);
    // No way back in for inline code: no 'unsafe-inline', no nonce or hash that an injected tag could carry.
    expect(scripts.some((s) => /^'(unsafe-|nonce-|sha)/.test(s))).toBe(false);
    // onerror= and onload= attributes are governed by script-src-attr (falling back to script-src).
    expect(csp.get('script-src-attr') ?? scripts).toEqual(["'none'"]);
  });
});
