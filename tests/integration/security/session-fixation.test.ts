import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { QueryTypes } from 'sequelize';
import { loadConfig } from '../../../server/src/config/index';
import { DEMO_PASSWORD, sessionCookieOf, startTestServer, type TestServer } from '../helpers/test-server';
import { PRODUCTION_ENV } from './helpers';

/** Session fixation and the session cookie (OWASP ASVS 4.0 V3.2.1, V3.3.1, V3.4; RFC 6265 section 4.1.2). */
let ts: TestServer;
beforeAll(async () => {
  ts = await startTestServer();
});
afterAll(async () => {
  await ts?.close();
});

/** The session id inside a signed cookie value `s:<id>.<signature>` (express-session's format). */
function sidOf(cookie: string): string {
  const value = decodeURIComponent(cookie.slice(cookie.indexOf('=') + 1));
  expect(value.startsWith('s:')).toBe(true);
  return value.slice(2, value.lastIndexOf('.'));
}

async function sessionRow(sid: string) {
  const rows = await ts.server.db.sequelize.query<{ sid: string }>('SELECT sid FROM sessions WHERE sid = ?', { replacements: [sid], type: QueryTypes.SELECT });
  return rows[0] ?? null;
}

async function plantedSession() {
  const res = await request(ts.server.http).get('/api/auth/csrf').expect(200);
  return { cookie: sessionCookieOf(res)!, token: res.body.csrfToken as string };
}

const signInWith = (cookie: string, token: string) =>
  request(ts.server.http).post('/api/auth/login').set('Cookie', cookie).set('X-CSRF-Token', token).send({ email: 'investigator@demo.test', password: DEMO_PASSWORD });

const setCookieHeaders = (res: request.Response) => (res.headers['set-cookie'] as unknown as string[] | undefined) ?? [];

describe('session fixation (OWASP ASVS 4.0 V3.2.1: a new session token on authentication)', () => {
  it('issues a new session id at sign-in and the id known before it is dead afterwards, its row gone', async () => {
    const planted = await plantedSession();
    const plantedSid = sidOf(planted.cookie);
    expect(await sessionRow(plantedSid)).not.toBeNull();
    const login = await signInWith(planted.cookie, planted.token);
    expect(login.status).toBe(200);
    const fresh = sessionCookieOf(login)!;
    expect(sidOf(fresh)).not.toBe(plantedSid);
    await request(ts.server.http).get('/api/auth/me').set('Cookie', planted.cookie).expect(401);
    expect(await sessionRow(plantedSid)).toBeNull();
    await request(ts.server.http).get('/api/auth/me').set('Cookie', fresh).expect(200);
  });

  it('sign-out destroys the server-side session: the replayed cookie is dead and its row is deleted (OWASP ASVS 4.0 V3.3.1)', async () => {
    const planted = await plantedSession();
    const login = await signInWith(planted.cookie, planted.token);
    const cookie = sessionCookieOf(login)!;
    const sid = sidOf(cookie);
    expect(await sessionRow(sid)).not.toBeNull();
    const out = await request(ts.server.http).post('/api/auth/logout').set('Cookie', cookie).set('X-CSRF-Token', login.body.csrfToken).expect(204);
    // The browser is told to drop the cookie too (an expiry in the past, RFC 6265 section 5.2.1).
    const cleared = setCookieHeaders(out).find((c) => c.startsWith('edgecase.sid='));
    expect(cleared).toMatch(/Expires=Thu, 01 Jan 1970/);
    expect(await sessionRow(sid)).toBeNull();
    await request(ts.server.http).get('/api/auth/me').set('Cookie', cookie).expect(401);
  });

  it('never accepts a session id the server did not issue', async () => {
    const forged = `edgecase.sid=${encodeURIComponent('s:attacker-chosen-session-id.not-a-signature')}`;
    const res = await request(ts.server.http).get('/api/auth/me').set('Cookie', forged);
    expect(res.status).toBe(401);
    // And it is not adopted: what the server sets, if anything, is an id of its own.
    const set = sessionCookieOf(await request(ts.server.http).get('/api/auth/csrf').set('Cookie', forged));
    expect(set && sidOf(set)).not.toBe('attacker-chosen-session-id');
  });
});

describe('session cookie flags (RFC 6265 sections 4.1.2.5-4.1.2.6; SameSite per RFC 6265bis; OWASP ASVS 4.0 V3.4.1-V3.4.3)', () => {
  it('is HttpOnly, SameSite=Lax and Path=/ in every mode', async () => {
    const planted = await plantedSession();
    const login = await signInWith(planted.cookie, planted.token);
    const cookie = setCookieHeaders(login).find((c) => c.startsWith('edgecase.sid='))!;
    expect(cookie).toMatch(/;\s*HttpOnly/i);
    expect(cookie).toMatch(/;\s*SameSite=Lax/i);
    expect(cookie).toMatch(/;\s*Path=\//i);
    // Test mode serves plain HTTP: there the flag would stop the browser from ever sending the cookie back.
    expect(ts.server.config.COOKIE_SECURE).toBe(false);
    expect(cookie).not.toMatch(/;\s*Secure/i);
  });

  it('is Secure in production mode: the configuration turns it on by default and refuses to turn it off', () => {
    const env: NodeJS.ProcessEnv = { ...process.env, ...PRODUCTION_ENV };
    delete env.COOKIE_SECURE;
    expect(loadConfig(env).COOKIE_SECURE).toBe(true);
    expect(loadConfig({ ...env, COOKIE_SECURE: 'true' }).COOKIE_SECURE).toBe(true);
    expect(() => loadConfig({ ...env, COOKIE_SECURE: 'false' })).toThrow(/COOKIE_SECURE/);
    expect(loadConfig({ ...env, EDGECASE_MODE: 'demo' }).COOKIE_SECURE).toBe(false);
  });

  it('a production server behind TLS sets the Secure flag, and sets no session cookie over plain HTTP', async () => {
    const prod = await startTestServer({ ...PRODUCTION_ENV, COOKIE_SECURE: undefined, TRUST_PROXY: '1' });
    try {
      // Behind a TLS-terminating proxy (X-Forwarded-Proto, trusted with TRUST_PROXY=1).
      const viaTls = await request(prod.server.http).get('/api/auth/csrf').set('X-Forwarded-Proto', 'https').expect(200);
      const cookie = setCookieHeaders(viaTls).find((c) => c.startsWith('edgecase.sid='));
      expect(cookie).toMatch(/;\s*Secure/i);
      expect(cookie).toMatch(/;\s*HttpOnly/i);
      const plain = await request(prod.server.http).get('/api/auth/csrf').expect(200);
      expect(sessionCookieOf(plain)).toBeUndefined();
    } finally {
      await prod.close();
    }
  });
});
