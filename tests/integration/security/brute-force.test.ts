import { afterAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { QueryTypes } from 'sequelize';
import { hashPassword } from '../../../server/src/auth/password';
import { createUser } from '../../../server/src/auth/user-repository';
import { csrfToken, startTestServer, type TestServer } from '../helpers/test-server';

/**
 * Sign-in brute force: the per-address rate limit, the per-account lock-out,
 * and that neither tells an attacker which accounts exist.
 * Defaults (server/src/config): LOGIN_MAX_FAILURES_PER_ACCOUNT 5, LOGIN_LOCKOUT_MINUTES 15.
 */
const RIGHT = 'right-password-1';
const servers: TestServer[] = [];
afterAll(async () => {
  for (const s of servers) await s.close();
});

async function server(env: Record<string, string> = {}) {
  const ts = await startTestServer(env);
  servers.push(ts);
  return ts;
}

let n = 0;
async function freshAccount(ts: TestServer) {
  n += 1;
  const email = `brute-${n}-${Date.now().toString(36)}@staff.demo.test`;
  await createUser(ts.server.db, { email, displayName: `Brute ${n}`, role: 'investigator', passwordHash: await hashPassword(RIGHT) });
  return email;
}

/** One sign-in attempt from an anonymous session with its CSRF token, optionally as forwarded for `from`. */
async function attempt(ts: TestServer, email: string, password: string, from?: string) {
  const agent = request.agent(ts.server.http);
  const token = await csrfToken(agent);
  const req = agent.post('/api/auth/login').set('X-CSRF-Token', token);
  if (from) req.set('X-Forwarded-For', from);
  const res = await req.send({ email, password });
  return { status: res.status, body: res.body as { error?: { code: string; message: string; retryAfterSeconds?: number } }, retryAfter: res.headers['retry-after'] as string | undefined };
}

async function signInAudit(ts: TestServer, email: string) {
  return ts.server.db.sequelize.query<{ outcome: string; details: string | null }>(
    "SELECT outcome, details FROM audit_log WHERE action = 'auth.sign_in' AND actor_label = ? ORDER BY id",
    { replacements: [email], type: QueryTypes.SELECT },
  );
}

const details = (rows: { details: string | null }[]) => rows.map((r) => (r.details ? (JSON.parse(r.details) as Record<string, unknown>) : {}));

describe('sign-in rate limit per address (OWASP ASVS 4.0 V2.2.1: anti-automation against brute force)', () => {
  it('answers 429 with Retry-After once one address has too many failures, refuses even the right password, and audits it', async () => {
    const ts = await server({ LOGIN_MAX_FAILURES_PER_IP: '3' });
    const email = await freshAccount(ts);
    const statuses = [];
    for (let i = 0; i < 3; i++) statuses.push((await attempt(ts, email, `wrong-${i}`)).status);
    expect(statuses).toEqual([401, 401, 401]);
    const limited = await attempt(ts, email, RIGHT);
    expect(limited.status).toBe(429);
    expect(limited.body.error?.code).toBe('rate_limited');
    // Retry-After in delay-seconds (RFC 9110 section 10.2.3): a positive integer, at most the 15-minute window.
    expect(limited.retryAfter).toMatch(/^[1-9]\d*$/);
    expect(Number(limited.retryAfter)).toBeLessThanOrEqual(15 * 60);
    expect(limited.body.error?.retryAfterSeconds).toBe(Number(limited.retryAfter));
    // Sign-in attempts are security events to log (OWASP ASVS 4.0 V7.2.1): the refusal is in the audit log.
    const audit = await signInAudit(ts, email);
    expect(audit.map((a) => a.outcome)).toEqual(['failure', 'failure', 'failure', 'denied']);
    expect(details(audit).at(-1)).toMatchObject({ reason: 'rate limited' });
  });

  it('is not escaped by a forged X-Forwarded-For while no proxy is trusted (TRUST_PROXY=0, the default)', async () => {
    const ts = await server({ LOGIN_MAX_FAILURES_PER_IP: '3' });
    expect(ts.server.config.TRUST_PROXY).toBe(0);
    const email = await freshAccount(ts);
    const statuses = [];
    for (let i = 0; i < 4; i++) statuses.push((await attempt(ts, email, `wrong-${i}`, `203.0.113.${10 + i}`)).status);
    // 203.0.113.0/24 is TEST-NET-3 (RFC 5737): documentation addresses.
    expect(statuses).toEqual([401, 401, 401, 429]);
  });
});

describe('per-account lock-out (OWASP ASVS 4.0 V2.2.1; OWASP Authentication Cheat Sheet, "Account Lockout")', () => {
  it('locks an account attacked from many addresses behind a trusted proxy, refuses the right password while locked, and audits it', async () => {
    // The per-address limit is lower than the attack, yet never reached: every attempt comes from another address.
    const ts = await server({ TRUST_PROXY: '1', LOGIN_MAX_FAILURES_PER_IP: '3' });
    const email = await freshAccount(ts);
    const statuses = [];
    for (let i = 0; i < 5; i++) statuses.push((await attempt(ts, email, `wrong-${i}`, `198.51.100.${20 + i}`)).status);
    // 198.51.100.0/24 is TEST-NET-2 (RFC 5737). The fifth failure locks.
    expect(statuses).toEqual([401, 401, 401, 401, 423]);
    const locked = await attempt(ts, email, RIGHT, '198.51.100.99');
    expect(locked.status).toBe(423);
    expect(locked.body.error?.code).toBe('account_locked');
    expect(Number(locked.retryAfter)).toBeGreaterThan(14 * 60);
    expect(Number(locked.retryAfter)).toBeLessThanOrEqual(15 * 60);
    const audit = await signInAudit(ts, email);
    expect(audit.map((a) => a.outcome)).toEqual(['failure', 'failure', 'failure', 'failure', 'failure', 'denied']);
    expect(details(audit)[4]).toMatchObject({ lockedOut: true });
    expect(details(audit)[5]).toMatchObject({ reason: 'locked out' });
  });
});

describe('no user enumeration (OWASP ASVS 4.0 V2; OWASP Authentication Cheat Sheet, "Authentication and Error Messages")', () => {
  it('answers an unknown e-mail exactly as a known one, attempt for attempt, through the lock-out', async () => {
    const ts = await server();
    const known = await freshAccount(ts);
    const unknown = `nobody-${Date.now().toString(36)}@staff.demo.test`;
    const answers = async (email: string) => {
      const out = [];
      for (let i = 0; i < 6; i++) out.push(await attempt(ts, email, `wrong-${i}`));
      return out;
    };
    const a = await answers(known);
    const b = await answers(unknown);
    expect(a.map((x) => x.status)).toEqual([401, 401, 401, 401, 423, 423]);
    for (let i = 0; i < a.length; i++) {
      expect({ status: b[i].status, code: b[i].body.error?.code, message: b[i].body.error?.message, retryAfter: b[i].retryAfter !== undefined }, `attempt ${i + 1}`).toEqual({
        status: a[i].status,
        code: a[i].body.error?.code,
        message: a[i].body.error?.message,
        retryAfter: a[i].retryAfter !== undefined,
      });
      // The wait may differ by the second that passed between the two series.
      expect(Math.abs((b[i].body.error?.retryAfterSeconds ?? 0) - (a[i].body.error?.retryAfterSeconds ?? 0))).toBeLessThanOrEqual(5);
    }
    // Nor does the right password of the known account differ from a guess at the unknown one while both are locked.
    const knownRight = await attempt(ts, known, RIGHT);
    const unknownGuess = await attempt(ts, unknown, RIGHT);
    expect([knownRight.status, unknownGuess.status]).toEqual([423, 423]);
    expect(unknownGuess.body.error?.message).toBe(knownRight.body.error?.message);
  });
});
