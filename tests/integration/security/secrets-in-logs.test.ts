import { randomBytes } from 'node:crypto';
import { readdir, readFile } from 'node:fs/promises';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { withoutLiterals } from '../../../server/src/db/sequelize';
import { DEMO_API_KEY } from '../../../server/src/demo/demo-accounts';
import { scrubLogValue } from '../../../server/src/lib/logger';
import { signWebhook } from '../../../server/src/outgoing/outgoing-events';
import { installChampion } from '../helpers/champion';
import { waitFor } from '../helpers/net';
import { DEMO_PASSWORD, type Agent } from '../helpers/test-server';
import { txn } from '../helpers/transactions';
import { startRealStack, type RealStack } from './real-stack';

/**
 * No secret in any log line (OWASP ASVS 4.0 V7.1.1: no credentials or
 * payment details in logs; V7.1.2: no other sensitive data; OWASP Logging
 * Cheat Sheet, "Data to exclude"). The web server and the workers run as real
 * processes logging everything they can (LOG_LEVEL=trace, SQL included) while
 * every route that handles a secret is used; then each secret, as sent and as
 * encoded on the wire, is looked for in every log line.
 */
const fresh = (what: string) => `${what}-${randomBytes(12).toString('base64url')}`;
const CONFIG_SECRETS = {
  SESSION_SECRET: fresh('session-secret'),
  PAN_HMAC_KEY: fresh('pan-hmac-key'),
  UPSTREAM_WEBHOOK_SECRET: fresh('webhook-secret'),
};

let stack: RealStack;
/** Name -> value of every secret that passed through the processes. */
const secrets = new Map<string, string>(Object.entries(CONFIG_SECRETS));
const remember = (name: string, value: string | undefined | null) => {
  expect(value, name).toEqual(expect.any(String));
  secrets.set(name, value!);
};

beforeAll(async () => {
  stack = await startRealStack('secrets', CONFIG_SECRETS, (db) => installChampion(db).then(() => undefined));
}, 180_000);
afterAll(async () => {
  await stack?.stop();
});

/** The session cookie a response set, as the header value, its decoded form and the bare session id. */
function rememberCookie(name: string, res: request.Response) {
  const raw = ((res.headers['set-cookie'] as unknown as string[] | undefined) ?? []).find((c) => c.startsWith('edgecase.sid='));
  if (!raw) return;
  const value = raw.slice('edgecase.sid='.length).split(';')[0];
  const decoded = decodeURIComponent(value);
  remember(`${name} session cookie`, value);
  remember(`${name} session cookie, decoded`, decoded);
  remember(`${name} session id`, decoded.slice(2, decoded.lastIndexOf('.')));
}

async function session(name: string, email: string, password: string): Promise<{ agent: Agent; csrf: string }> {
  const agent = request.agent(stack.baseUrl);
  const first = await agent.get('/api/auth/csrf').expect(200);
  remember(`${name} CSRF token before sign-in`, first.body.csrfToken);
  rememberCookie(`${name} anonymous`, first);
  const res = await agent.post('/api/auth/login').set('X-CSRF-Token', first.body.csrfToken).send({ email, password });
  expect(res.status, JSON.stringify(res.body)).toBe(200);
  remember(`${name} CSRF token`, res.body.csrfToken);
  rememberCookie(name, res);
  return { agent, csrf: res.body.csrfToken as string };
}

async function exercise() {
  secrets.set('demo API key', DEMO_API_KEY);
  secrets.set('demo password (right)', DEMO_PASSWORD);
  // Wrong passwords, for a real account and for an unknown one.
  for (const [email, password] of [
    ['admin@demo.test', fresh('wrong-password')],
    ['nobody@staff.demo.test', fresh('guessed-password')],
  ]) {
    secrets.set(`wrong password for ${email}`, password);
    const agent = request.agent(stack.baseUrl);
    const t = await agent.get('/api/auth/csrf');
    expect((await agent.post('/api/auth/login').set('X-CSRF-Token', t.body.csrfToken).send({ email, password })).status).toBe(401);
  }
  // A CSRF token sent where it does not belong.
  const stray = fresh('stray-csrf-token');
  secrets.set('wrong CSRF token', stray);
  await request(stack.baseUrl).post('/api/auth/login').set('X-CSRF-Token', stray).send({ email: 'admin@demo.test', password: DEMO_PASSWORD }).expect(403);

  const admin = await session('admin', 'admin@demo.test', DEMO_PASSWORD);
  // An API key made and used, and one that does not exist.
  const made = await admin.agent.post('/api/admin/api-keys').set('X-CSRF-Token', admin.csrf).send({ name: 'Secrets check', scopes: ['transactions:write', 'transactions:read'] });
  expect(made.status, JSON.stringify(made.body)).toBe(201);
  remember('created API key', made.body.key);
  const risky = txn({ amount: '2900.00', card: { number: '4111111111111111', cardholderId: 'ch-4800' } });
  await request(stack.baseUrl).post('/api/v1/transactions').set('Authorization', `Bearer ${made.body.key}`).send(risky).expect(202);
  const unknownKey = fresh('not-an-api-key');
  secrets.set('unknown API key', unknownKey);
  await request(stack.baseUrl).post('/api/v1/transactions').set('Authorization', `Bearer ${unknownKey}`).send(risky).expect(401);
  await request(stack.baseUrl).post('/api/v1/decisions').set('Authorization', `Bearer ${DEMO_API_KEY}`).send(txn({ card: { number: '5555555555554444', cardholderId: 'ch-4801' } })).expect(200);

  // An invitation: the token travels by e-mail, is looked up, used once, and the new password signs in.
  const email = `invited-${Date.now().toString(36)}@staff.demo.test`;
  const invited = await admin.agent.post('/api/admin/users').set('X-CSRF-Token', admin.csrf).send({ email, displayName: 'Invited Person', role: 'investigator' });
  expect(invited.status, JSON.stringify(invited.body)).toBe(201);
  const token = await waitFor(async () => {
    for (const f of (await readdir(stack.mailDir)).filter((n) => n.endsWith('.json'))) {
      const m = JSON.parse(await readFile(path.join(stack.mailDir, f), 'utf8')) as { to: string[]; text: string };
      const t = m.to.includes(email) ? /accept-invite\?token=([^\s&]+)/.exec(m.text)?.[1] : undefined;
      if (t) return decodeURIComponent(t);
    }
    return null;
  }, 30_000);
  remember('invite token', token);
  await request(stack.baseUrl).get(`/accept-invite?token=${encodeURIComponent(token)}`).expect(200);
  const anon = request.agent(stack.baseUrl);
  const t = await anon.get('/api/auth/csrf');
  expect((await anon.post('/api/auth/invite').set('X-CSRF-Token', t.body.csrfToken).send({ token })).status).toBe(200);
  const newPassword = fresh('new-password');
  remember('password set from the invitation', newPassword);
  const accepted = await anon.post('/api/auth/accept-invite').set('X-CSRF-Token', t.body.csrfToken).send({ token, password: newPassword });
  expect(accepted.status, JSON.stringify(accepted.body)).toBe(200);
  const person = await session('invited person', email, newPassword);
  await person.agent.post('/api/auth/logout').set('X-CSRF-Token', person.csrf).expect(204);

  // A card block, so the outgoing worker signs a webhook with its secret.
  const caseId = await waitFor(async () => {
    const r = await request(stack.baseUrl).get(`/api/v1/transactions/${risky.id}`).set('Authorization', `Bearer ${made.body.key}`);
    return r.body.transaction?.caseId as number | null;
  }, 30_000);
  const inv = await session('investigator', 'investigator@demo.test', DEMO_PASSWORD);
  await inv.agent.post(`/api/cases/${caseId}/claim`).set('X-CSRF-Token', inv.csrf).expect(200);
  await inv.agent.post(`/api/cases/${caseId}/card`).set('X-CSRF-Token', inv.csrf).send({ action: 'block', reason: 'Cardholder reports it stolen' }).expect(200);
  const hook = await waitFor(async () => stack.webhooks[0], 30_000);
  // Signed with the configured secret (HMAC-SHA-256, RFC 2104): the secret was in use while the logs were written.
  expect(hook.headers['x-edgecase-signature']).toBe(signWebhook(CONFIG_SECRETS.UPSTREAM_WEBHOOK_SECRET, String(hook.headers['x-edgecase-timestamp']), hook.body));
}

/** Each secret as sent, and as a URL or JSON would carry it. */
function spellings(value: string): string[] {
  return [...new Set([value, encodeURIComponent(value), JSON.stringify(value).slice(1, -1)])];
}

describe('secrets in logs', () => {
  it('never logs a secret: config secrets, API keys, passwords, invite tokens, CSRF tokens, session cookies and ids', async () => {
    await exercise();
    const logs = await stack.logs();
    // The processes did log the traffic, at the level that says the most: the check below looked at something.
    const all = logs.map((l) => l.text).join('\n');
    for (const seen of ['"url":"/api/auth/login"', '"url":"/api/auth/accept-invite"', '"url":"/api/admin/api-keys"', '"msg":"sql"', '"msg":"mail sent"']) expect(all, seen).toContain(seen);
    expect(logs.map((l) => l.file).sort()).toEqual(['web.log', 'workers.log']);
    expect(secrets.size).toBeGreaterThan(20);

    const leaks: string[] = [];
    for (const { file, text } of logs) {
      text.split('\n').forEach((line, i) => {
        for (const [name, value] of secrets) {
          if (spellings(value).some((s) => line.includes(s))) leaks.push(`${file}:${i + 1} holds the ${name}`);
        }
      });
    }
    expect(leaks).toEqual([]);
  });

  it('logs SQL without its literals, and log fields scrubbed of card numbers at any depth', () => {
    expect(withoutLiterals("SELECT * FROM sessions WHERE sid = 'AbC-123' AND note = 'it''s \\' x' LIMIT 1")).toBe("SELECT * FROM sessions WHERE sid = '?' AND note = '?' LIMIT 1");
    expect(scrubLogValue({ err: new Error('card 4111111111111111 refused'), req: { url: '/api/v1/transactions/4111-1111-1111-1111' } })).toMatchObject({
      err: { message: 'card [digits removed] refused' },
      req: { url: '/api/v1/transactions/[digits removed]' },
    });
  });
});
