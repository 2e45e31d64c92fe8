import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { DEMO_API_KEY } from '../../../server/src/demo/demo-accounts';
import { startTestServer, type TestServer } from '../helpers/test-server';
import { cspDirectives, fakeClientDist, isApiKeyRoute, label, PRODUCTION_ENV, roleFor, scriptSources, sessionsPerRole, urlOf } from './helpers';

/**
 * Security headers on the three kinds of answer: the HTML shell, an API JSON
 * answer and an error (OWASP ASVS 4.0 V14.4; OWASP Secure Headers Project;
 * OWASP HTTP Headers Cheat Sheet).
 */
let ts: TestServer;
let prod: TestServer;
let session: ReturnType<typeof sessionsPerRole>;

beforeAll(async () => {
  const dist = await fakeClientDist();
  ts = await startTestServer({ CLIENT_DIST: dist });
  prod = await startTestServer({ ...PRODUCTION_ENV, CLIENT_DIST: dist });
  session = sessionsPerRole(ts);
});
afterAll(async () => {
  await ts?.close();
  await prod?.close();
});

function expectSecurityHeaders(res: request.Response, what: string) {
  const csp = cspDirectives(res.headers['content-security-policy']);
  const scripts = scriptSources(csp);
  expect(scripts, `${what}: script sources`).toBeDefined();
  // No inline script and no eval (OWASP ASVS 4.0 V14.4.3; CSP Level 3 'unsafe-inline', 'unsafe-eval').
  expect(scripts, what).not.toContain("'unsafe-inline'");
  expect(scripts, what).not.toContain("'unsafe-eval'");
  expect(scripts, what).not.toContain('*');
  expect(csp.get('object-src'), what).toEqual(["'none'"]);
  // Framing refused (OWASP ASVS 4.0 V14.4.7): CSP frame-ancestors 'none', or X-Frame-Options DENY (RFC 7034).
  const noFraming = csp.get('frame-ancestors')?.join(' ') === "'none'" || String(res.headers['x-frame-options']).toUpperCase() === 'DENY';
  expect(noFraming, `${what}: framing`).toBe(true);
  expect(res.headers['x-content-type-options'], what).toBe('nosniff');
  // OWASP ASVS 4.0 V14.4.6: a Referrer-Policy that keeps URLs to the origin at most.
  expect(['no-referrer', 'same-origin', 'strict-origin', 'strict-origin-when-cross-origin'], what).toContain(res.headers['referrer-policy']);
  expect(res.headers['cross-origin-opener-policy'], what).toBe('same-origin');
  expect(res.headers['x-powered-by'], what).toBeUndefined();
}

describe('security headers', () => {
  it('on the HTML shell, a signed-in JSON answer and error answers', async () => {
    const shell = await request(ts.server.http).get('/queue').expect(200);
    expect(shell.headers['content-type']).toMatch(/^text\/html/);
    expectSecurityHeaders(shell, 'HTML shell');
    const inv = await session('investigator');
    const json = await inv.agent.get('/api/auth/me').expect(200);
    expectSecurityHeaders(json, 'API JSON');
    for (const [what, res] of [
      ['404 JSON', await request(ts.server.http).get('/api/no-such-route')],
      ['401 JSON', await request(ts.server.http).get('/api/cases')],
      ['400 JSON', await request(ts.server.http).post('/api/auth/login').set('Content-Type', 'application/json').send('{"broken')],
    ] as const) {
      expect(res.status, what).toBeGreaterThanOrEqual(400);
      expectSecurityHeaders(res, what);
    }
  });

  it('sends Strict-Transport-Security in production mode (RFC 6797; OWASP ASVS 4.0 V14.4.5: max-age of a year or more)', async () => {
    for (const res of [await request(prod.server.http).get('/queue'), await request(prod.server.http).get('/api/health')]) {
      const hsts = String(res.headers['strict-transport-security']);
      const maxAge = Number(/max-age=(\d+)/.exec(hsts)?.[1]);
      expect(maxAge).toBeGreaterThanOrEqual(31_536_000);
      expect(hsts).toMatch(/includeSubDomains/i);
      expectSecurityHeaders(res, 'production');
    }
  });

  it('never lets an API answer be stored by a cache: Cache-Control no-store on every GET route, called as its rightful caller (OWASP ASVS 4.0 V8.2.1)', async () => {
    const failures: string[] = [];
    for (const spec of ts.server.routes.filter((r) => r.method === 'get')) {
      const role = roleFor(spec.access);
      const res = isApiKeyRoute(spec)
        ? await request(ts.server.http).get(urlOf(spec)).set('Authorization', `Bearer ${DEMO_API_KEY}`)
        : role
          ? await (await session(role)).agent.get(urlOf(spec))
          : await request(ts.server.http).get(urlOf(spec));
      const cc = String(res.headers['cache-control'] ?? '');
      if (!/\bno-store\b/.test(cc)) failures.push(`${label(spec)} (${res.status}): Cache-Control "${cc}"`);
    }
    expect(failures).toEqual([]);
    // With real data, not just the 404 of an id that does not exist.
    const admin = await session('admin');
    for (const url of ['/api/admin/users', '/api/admin/api-keys', '/api/audit', '/api/auth/me']) {
      const res = await admin.agent.get(url).expect(200);
      expect(res.headers['cache-control'], url).toMatch(/\bno-store\b/);
    }
  });
});
