import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import type { RouteSpec } from '../../../server/src/access/route-table';
import { csrfToken, DEMO_PASSWORD, startTestServer, type TestServer } from '../helpers/test-server';
import { changedTables, dataFingerprint, isApiKeyRoute, isStateChanging, label, roleFor, sessionsPerRole, urlOf, type Session } from './helpers';

/**
 * CSRF, generated from the mounted route table: every state-changing route a
 * browser session can reach refuses a request without the session's
 * synchronizer token (OWASP ASVS 4.0 V4.2.2; OWASP CSRF Prevention Cheat
 * Sheet, "Synchronizer Token Pattern").
 */
let ts: TestServer;
let session: ReturnType<typeof sessionsPerRole>;
let other: ReturnType<typeof sessionsPerRole>;

beforeAll(async () => {
  ts = await startTestServer();
  session = sessionsPerRole(ts);
  other = sessionsPerRole(ts);
});
afterAll(async () => {
  await ts?.close();
});

async function anonymous(): Promise<Session> {
  const agent = request.agent(ts.server.http);
  return { agent, csrf: await csrfToken(agent) };
}

/** The session a route is tried with (a role allowed there, or an anonymous one for public routes) and a second session of the same kind. */
async function sessionsFor(spec: RouteSpec): Promise<{ mine: Session; theirs: Session }> {
  const role = roleFor(spec.access);
  if (role === null) return { mine: await anonymous(), theirs: await anonymous() };
  return { mine: await session(role), theirs: await other(role) };
}

const send = (s: Session, spec: RouteSpec, token: string | null) => {
  const req = s.agent[spec.method](urlOf(spec));
  if (token !== null) req.set('X-CSRF-Token', token);
  // Sign-out would end the session the other routes use: it goes last (see the sweep).
  return req.send({});
};

function sessionRoutes(): RouteSpec[] {
  const routes = ts.server.routes.filter((r) => isStateChanging(r) && !isApiKeyRoute(r));
  // Sign-out ends the session it is sent with when the check fails open: try it last.
  return [...routes.filter((r) => r.path !== '/auth/logout'), ...routes.filter((r) => r.path === '/auth/logout')];
}

describe('CSRF on every state-changing route with a session', () => {
  it('the table has such routes, none of them opts out, and the sign-in route is one of them', () => {
    const routes = sessionRoutes();
    expect(routes.length).toBeGreaterThan(40);
    expect(routes.filter((r) => r.csrf === false).map(label)).toEqual([]);
    expect(routes.map(label)).toContain('POST /auth/login');
  });

  it('refuses no token, a wrong token and another session’s token with 403 csrf_invalid, and nothing changes', async () => {
    // Sessions first: signing in writes to the audit log and the user row.
    const tried = [];
    for (const spec of sessionRoutes()) tried.push({ spec, ...(await sessionsFor(spec)) });
    const before = await dataFingerprint(ts);
    const failures: string[] = [];
    for (const { spec, mine, theirs } of tried) {
      const variants: [string, string | null][] = [
        ['no token', null],
        ['a wrong token', 'f'.repeat(64)],
        ['another session’s token', theirs.csrf],
      ];
      for (const [what, token] of variants) {
        const res = await send(mine, spec, token);
        if (res.status !== 403 || res.body?.error?.code !== 'csrf_invalid') failures.push(`${label(spec)} with ${what}: ${res.status} ${res.body?.error?.code ?? ''}`);
      }
    }
    expect(failures).toEqual([]);
    expect(changedTables(before, await dataFingerprint(ts))).toEqual([]);

    // The same fingerprint sees a change that went through with the right token: the check above can fail.
    const inv = await session('investigator');
    await inv.agent.put('/api/queue/views').set('X-CSRF-Token', inv.csrf).send({ views: [{ name: 'csrf check', query: {} }] }).expect(200);
    expect(changedTables(before, await dataFingerprint(ts))).toEqual(['user_preferences']);
  });

  it('refuses a sign-in without the token even with the right password, and no session is signed in (login CSRF)', async () => {
    const agent = request.agent(ts.server.http);
    await csrfToken(agent);
    const res = await agent.post('/api/auth/login').send({ email: 'investigator@demo.test', password: DEMO_PASSWORD });
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe('csrf_invalid');
    await agent.get('/api/auth/me').expect(401);
    // With no session at all (a cross-site form's first request) it is refused too.
    const bare = await request(ts.server.http).post('/api/auth/login').send({ email: 'investigator@demo.test', password: DEMO_PASSWORD });
    expect(bare.status).toBe(403);
  });

  it('skips API-key routes because they never read the session: a browser’s cookie gets no further than 401 there', async () => {
    // CSRF rides on credentials the browser adds by itself (cookies); an Authorization header is never added
    // by the browser to a cross-site request (OWASP CSRF Prevention Cheat Sheet), so these routes need no token.
    const apiKeyRoutes = ts.server.routes.filter(isApiKeyRoute);
    expect(apiKeyRoutes.filter(isStateChanging).map(label)).toEqual(['POST /v1/transactions', 'POST /v1/decisions']);
    const admin = await session('admin');
    for (const spec of apiKeyRoutes) {
      const res = await admin.agent[spec.method](urlOf(spec)).set('X-CSRF-Token', admin.csrf).send({});
      expect(res.status, label(spec)).toBe(401);
      expect(res.body.error.code, label(spec)).toBe('api_key_missing');
    }
  });
});
