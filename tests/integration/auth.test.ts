import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { QueryTypes } from 'sequelize';
import { maskPansInText } from '../../shared/src/card/pan';
import { hashPassword } from '../../server/src/auth/password';
import { createUser } from '../../server/src/auth/user-repository';
import { verifyAuditChain } from '../../server/src/audit/audit-repository';
import { connectSocket, csrfToken, DEMO_PASSWORD, sessionCookieOf, signedInAgent, startTestServer, type TestServer } from './helpers/test-server';

let ts: TestServer;

beforeAll(async () => {
  ts = await startTestServer();
});
afterAll(async () => {
  await ts?.close();
});

async function auditRows(action: string, label: string) {
  return ts.server.db.sequelize.query<{ outcome: string; details: string | null }>(
    'SELECT outcome, details FROM audit_log WHERE action = ? AND actor_label = ? ORDER BY id',
    { replacements: [action, maskPansInText(label)], type: QueryTypes.SELECT },
  );
}

async function freshUser(prefix: string) {
  const email = `${prefix}-${Date.now()}-${Math.random().toString(36).slice(2, 7)}@example.test`;
  await createUser(ts.server.db, { email, displayName: prefix, role: 'investigator', passwordHash: await hashPassword('right-password-1') });
  return email;
}

describe('sign-in', () => {
  it('signs in with the right password, sets an httpOnly SameSite cookie and returns the role', async () => {
    const agent = request.agent(ts.server.http);
    const token = await csrfToken(agent);
    const res = await agent.post('/api/auth/login').set('X-CSRF-Token', token).send({ email: 'supervisor@demo.test', password: DEMO_PASSWORD });
    expect(res.status).toBe(200);
    expect(res.body.user).toMatchObject({ email: 'supervisor@demo.test', role: 'supervisor' });
    expect(typeof res.body.csrfToken).toBe('string');
    const cookie = (res.headers['set-cookie'] as unknown as string[]).find((c) => c.startsWith('edgecase.sid='))!;
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Lax/i);
    const me = await agent.get('/api/auth/me').expect(200);
    expect(me.body.user.role).toBe('supervisor');
    const audit = await auditRows('auth.sign_in', 'supervisor@demo.test');
    expect(audit.at(-1)?.outcome).toBe('success');
  });

  it('answers 401 for a wrong password and for an unknown email, with the same message, and audits both', async () => {
    const agent = request.agent(ts.server.http);
    const token = await csrfToken(agent);
    const wrong = await agent.post('/api/auth/login').set('X-CSRF-Token', token).send({ email: 'scientist@demo.test', password: 'not-it' });
    const unknown = await agent.post('/api/auth/login').set('X-CSRF-Token', token).send({ email: 'nobody@demo.test', password: 'not-it' });
    expect(wrong.status).toBe(401);
    expect(unknown.status).toBe(401);
    expect(wrong.body.error.code).toBe('invalid_credentials');
    expect(unknown.body.error.message).toBe(wrong.body.error.message);
    expect((await auditRows('auth.sign_in', 'scientist@demo.test')).at(-1)?.outcome).toBe('failure');
    expect((await auditRows('auth.sign_in', 'nobody@demo.test')).at(-1)?.outcome).toBe('failure');
    await agent.get('/api/auth/me').expect(401);
  });

  it('names the offending field of a malformed sign-in body', async () => {
    const agent = request.agent(ts.server.http);
    const token = await csrfToken(agent);
    const res = await agent.post('/api/auth/login').set('X-CSRF-Token', token).send({ email: 'not-an-email', password: '' });
    expect(res.status).toBe(400);
    const paths = (res.body.error.fields as { path: string }[]).map((f) => f.path).sort();
    expect(paths).toEqual(['email', 'password']);
  });

  it('signs in an e-mail whose name holds a Luhn-valid digit run, and audits that name masked', async () => {
    // 4111111111111111 is the test card number the card schemes publish (from memory); ISO/IEC 7812 Luhn-valid.
    const email = `pan-4111111111111111-${Math.random().toString(36).slice(2, 7)}@example.test`;
    await createUser(ts.server.db, { email, displayName: 'digits', role: 'investigator', passwordHash: await hashPassword('right-password-1') });
    const agent = request.agent(ts.server.http);
    const token = await csrfToken(agent);
    const ok = await agent.post('/api/auth/login').set('X-CSRF-Token', token).send({ email, password: 'right-password-1' });
    expect(ok.status).toBe(200);
    const masked = email.replace('4111111111111111', '411111••••••1111');
    expect((await auditRows('auth.sign_in', masked)).at(-1)?.outcome).toBe('success');
    const raw = await ts.server.db.sequelize.query('SELECT id FROM audit_log WHERE actor_label = ?', { replacements: [email], type: QueryTypes.SELECT });
    expect(raw).toEqual([]);
  });

  it('locks the account after repeated failures, even against the right password, until the lock is lifted', async () => {
    const email = await freshUser('lockout');
    const agent = request.agent(ts.server.http);
    const token = await csrfToken(agent);
    const statuses: number[] = [];
    for (let i = 0; i < 5; i += 1) {
      const r = await agent.post('/api/auth/login').set('X-CSRF-Token', token).send({ email, password: `wrong-${i}` });
      statuses.push(r.status);
    }
    // Default LOGIN_MAX_FAILURES_PER_ACCOUNT = 5: four plain refusals, then the fifth failure locks.
    expect(statuses).toEqual([401, 401, 401, 401, 423]);
    const locked = await agent.post('/api/auth/login').set('X-CSRF-Token', token).send({ email, password: 'right-password-1' });
    expect(locked.status).toBe(423);
    expect(locked.body.error.code).toBe('account_locked');
    expect(locked.body.error.retryAfterSeconds).toBeGreaterThan(14 * 60);
    expect(locked.headers['retry-after']).toBeDefined();
    const audit = await auditRows('auth.sign_in', email);
    expect(audit.map((a) => a.outcome)).toEqual(['failure', 'failure', 'failure', 'failure', 'failure', 'denied']);
    // An expired lock no longer blocks, and the count starts again.
    await ts.server.db.sequelize.query('UPDATE users SET locked_until = DATE_SUB(UTC_TIMESTAMP(3), INTERVAL 1 MINUTE) WHERE email = ?', {
      replacements: [email],
      type: QueryTypes.UPDATE,
    });
    const ok = await agent.post('/api/auth/login').set('X-CSRF-Token', token).send({ email, password: 'right-password-1' });
    expect(ok.status).toBe(200);
  });

  it('rate-limits failed sign-ins per client address across accounts', async () => {
    const limited = await startTestServer({ LOGIN_MAX_FAILURES_PER_IP: '3' });
    try {
      const agent = request.agent(limited.server.http);
      const token = await csrfToken(agent);
      const statuses: number[] = [];
      for (const email of ['a@demo.test', 'b@demo.test', 'c@demo.test', 'investigator@demo.test']) {
        const r = await agent.post('/api/auth/login').set('X-CSRF-Token', token).send({ email, password: 'wrong' });
        statuses.push(r.status);
      }
      expect(statuses).toEqual([401, 401, 401, 429]);
      const blocked = await agent.post('/api/auth/login').set('X-CSRF-Token', token).send({ email: 'investigator@demo.test', password: DEMO_PASSWORD });
      expect(blocked.status).toBe(429);
      expect(Number(blocked.headers['retry-after'])).toBeGreaterThan(0);
    } finally {
      await limited.close();
    }
  });
});

describe('CSRF', () => {
  it('refuses a state-changing request without the token or with a wrong one', async () => {
    const agent = request.agent(ts.server.http);
    await csrfToken(agent);
    const none = await agent.post('/api/auth/login').send({ email: 'admin@demo.test', password: DEMO_PASSWORD });
    expect(none.status).toBe(403);
    expect(none.body.error.code).toBe('csrf_invalid');
    const wrong = await agent.post('/api/auth/login').set('X-CSRF-Token', 'x'.repeat(64)).send({ email: 'admin@demo.test', password: DEMO_PASSWORD });
    expect(wrong.status).toBe(403);
  });

  it('refuses a token taken from another session', async () => {
    const a = request.agent(ts.server.http);
    const b = request.agent(ts.server.http);
    const tokenOfA = await csrfToken(a);
    await csrfToken(b);
    const res = await b.post('/api/auth/login').set('X-CSRF-Token', tokenOfA).send({ email: 'admin@demo.test', password: DEMO_PASSWORD });
    expect(res.status).toBe(403);
  });

  it('protects sign-out of a signed-in session too', async () => {
    const { agent, csrf } = await signedInAgent(ts, 'admin');
    await agent.post('/api/auth/logout').expect(403);
    await agent.get('/api/auth/me').expect(200);
    await agent.post('/api/auth/logout').set('X-CSRF-Token', csrf).expect(204);
    await agent.get('/api/auth/me').expect(401);
  });
});

describe('session', () => {
  it('regenerates the session id on sign-in, so a planted id is worthless (session fixation)', async () => {
    const before = await request(ts.server.http).get('/api/auth/csrf');
    const plantedCookie = sessionCookieOf(before)!;
    const token = before.body.csrfToken as string;
    const login = await request(ts.server.http)
      .post('/api/auth/login')
      .set('Cookie', plantedCookie)
      .set('X-CSRF-Token', token)
      .send({ email: 'investigator@demo.test', password: DEMO_PASSWORD });
    expect(login.status).toBe(200);
    const after = sessionCookieOf(login)!;
    expect(after).toBeDefined();
    expect(after).not.toBe(plantedCookie);
    await request(ts.server.http).get('/api/auth/me').set('Cookie', plantedCookie).expect(401);
    await request(ts.server.http).get('/api/auth/me').set('Cookie', after).expect(200);
  });

  it('keeps the session in MariaDB with its user and an idle expiry', async () => {
    const { agent } = await signedInAgent(ts, 'scientist@demo.test');
    const me = await agent.get('/api/auth/me').expect(200);
    const rows = await ts.server.db.sequelize.query<{ expires: Date }>('SELECT expires FROM sessions WHERE user_id = ? ORDER BY updated_at DESC LIMIT 1', {
      replacements: [me.body.user.id],
      type: QueryTypes.SELECT,
    });
    expect(rows).toHaveLength(1);
    const idleMs = new Date(rows[0].expires).getTime() - Date.now();
    // SESSION_IDLE_MINUTES defaults to 30; the expiry rolls forward on each request.
    expect(idleMs).toBeGreaterThan(29 * 60_000);
    expect(idleMs).toBeLessThanOrEqual(30 * 60_000 + 1_000);
  });

  it('ends the session after the idle timeout', async () => {
    const { agent } = await signedInAgent(ts, 'scientist@demo.test');
    const me = await agent.get('/api/auth/me').expect(200);
    await ts.server.db.sequelize.query('UPDATE sessions SET expires = DATE_SUB(UTC_TIMESTAMP(3), INTERVAL 1 SECOND) WHERE user_id = ?', {
      replacements: [me.body.user.id],
      type: QueryTypes.UPDATE,
    });
    await agent.get('/api/auth/me').expect(401);
  });
});

describe('sockets', () => {
  it('refuses a socket without a signed-in session', async () => {
    const socket = connectSocket(ts.baseUrl);
    const outcome = await new Promise<string>((resolve) => {
      socket.on('connect', () => resolve('connected'));
      socket.on('connect_error', () => resolve('refused'));
    });
    socket.close();
    expect(outcome).toBe('refused');
  });

  it('accepts a signed-in socket and disconnects it when that session signs out', async () => {
    const agent = request.agent(ts.server.http);
    const token = await csrfToken(agent);
    const login = await agent.post('/api/auth/login').set('X-CSRF-Token', token).send({ email: 'investigator@demo.test', password: DEMO_PASSWORD });
    const cookie = sessionCookieOf(login)!;
    const socket = connectSocket(ts.baseUrl, cookie);
    const hello = await new Promise<{ user: { role: string } }>((resolve, reject) => {
      socket.on('hello', resolve);
      socket.on('connect_error', reject);
    });
    expect(hello.user.role).toBe('investigator');
    const ended = new Promise<{ reason: string }>((resolve) => socket.on('session:ended', resolve));
    const disconnected = new Promise<void>((resolve) => socket.on('disconnect', () => resolve()));
    await agent.post('/api/auth/logout').set('X-CSRF-Token', login.body.csrfToken).expect(204);
    expect((await ended).reason).toBe('signed_out');
    await disconnected;
    socket.close();
  });
});

describe('audit log', () => {
  it('is append-only in the database and its hash chain verifies', async () => {
    const db = ts.server.db;
    await expect(db.sequelize.query("UPDATE audit_log SET action = 'x' WHERE id = 1", { type: QueryTypes.UPDATE })).rejects.toThrow(/append-only/);
    await expect(db.sequelize.query('DELETE FROM audit_log WHERE id = 1', { type: QueryTypes.DELETE })).rejects.toThrow(/append-only/);
    const v = await verifyAuditChain(db);
    expect(v.ok).toBe(true);
    expect(v.checked).toBeGreaterThan(3);
  });
});

describe('errors', () => {
  it('answers malformed JSON with 400 and an oversized body with 413, never 500', async () => {
    const bad = await request(ts.server.http).post('/api/auth/login').set('Content-Type', 'application/json').send('{"email":');
    expect(bad.status).toBe(400);
    expect(bad.body.error.code).toBe('malformed_json');
    const big = await request(ts.server.http)
      .post('/api/auth/login')
      .set('Content-Type', 'application/json')
      .send(JSON.stringify({ email: 'a@b.test', password: 'x'.repeat(3 * 1024 * 1024) }));
    expect(big.status).toBe(413);
    const missing = await request(ts.server.http).get('/api/no-such-route');
    expect(missing.status).toBe(404);
    expect(missing.body.error.code).toBe('not_found');
  });

  it('sends security headers', async () => {
    const res = await request(ts.server.http).get('/api/health');
    expect(res.headers['content-security-policy']).toContain("default-src 'self'");
    expect(res.headers['x-content-type-options']).toBe('nosniff');
    expect(res.headers['x-frame-options']).toBeDefined();
    expect(res.headers['x-powered-by']).toBeUndefined();
  });
});

describe('health', () => {
  it('checks MariaDB and Redis', async () => {
    const res = await request(ts.server.http).get('/api/health').expect(200);
    expect(res.body.status).toBe('ok');
    expect(res.body.checks.db.ok).toBe(true);
    expect(res.body.checks.redis.ok).toBe(true);
  });
});
