import { createHash } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { QueryTypes } from 'sequelize';
import { createMailWorker } from '../../workers/src/mail.worker';
import { csrfToken, startTestServer, type TestServer } from './helpers/test-server';
import { liveSocket, mailCatcher, newPerson, send, signIn, type Person } from './helpers/supervision-kit';
import { txn } from './helpers/transactions';
import { waitFor } from './helpers/net';

let ts: TestServer;
let admin: Person;
let findMail: Awaited<ReturnType<typeof mailCatcher>>['find'];
const closers: (() => Promise<unknown>)[] = [];

const q = <T extends object>(sql: string, replacements: unknown[] = []) =>
  ts.server.db.sequelize.query<T>(sql, { replacements, type: QueryTypes.SELECT });

/** A visitor without a session (CSRF token of its own), as the invitation page is. */
async function visitor() {
  const agent = request.agent(ts.server.http);
  return { agent, csrf: await csrfToken(agent) };
}

const tokenOf = (text: string) => /accept-invite\?token=([A-Za-z0-9_%-]+)/.exec(text)?.[1];

beforeAll(async () => {
  ts = await startTestServer();
  const mail = await mailCatcher();
  findMail = mail.find;
  const mailer = createMailWorker({ ...ts.server.config, SMTP_PORT: mail.catcher.port }, ts.server.db);
  closers.push(() => mailer.close(), () => mail.catcher.stop());
  admin = await signIn(ts, 'admin@demo.test');
});

afterAll(async () => {
  for (const c of closers) await c().catch(() => undefined);
  await ts?.close();
});

describe('invitations', () => {
  it('sends a one-time link (hashed at rest) that sets the password once, then stops working', async () => {
    const email = `new-analyst-${Date.now()}@staff.demo.test`;
    const res = await send(admin, 'post', '/api/admin/users', { email, displayName: 'New Analyst', role: 'investigator' });
    expect(res.status).toBe(201);
    expect(res.body.user).toMatchObject({ email, role: 'investigator', status: 'invited' });
    const mail = await findMail((m) => m.to.includes(email));
    expect(mail.subject).toBe('Your Edgecase account');
    const token = decodeURIComponent(tokenOf(mail.text)!);
    expect(token.length).toBeGreaterThanOrEqual(40);

    // Only the SHA-256 of the token is stored.
    const rows = await q<{ token_hash: string; expires_at: Date }>('SELECT i.token_hash, i.expires_at FROM user_invites i JOIN users u ON u.id = i.user_id WHERE u.email = ?', [email]);
    expect(rows).toHaveLength(1);
    expect(rows[0].token_hash).toBe(createHash('sha256').update(token).digest('hex'));
    expect(JSON.stringify(await q('SELECT * FROM user_invites'))).not.toContain(token);
    const hours = (new Date(rows[0].expires_at).getTime() - Date.now()) / 3_600_000;
    expect(hours).toBeGreaterThan(71);
    expect(hours).toBeLessThanOrEqual(72);
    // The audit trail says who was invited, never with the token.
    const [audit] = await q<{ details: string }>("SELECT details FROM audit_log WHERE action = 'user.invite' ORDER BY id DESC LIMIT 1");
    expect(audit.details).not.toContain(token);

    const v = await visitor();
    const lookup = await send(v, 'post', '/api/auth/invite', { token });
    expect(lookup.status).toBe(200);
    expect(lookup.body).toMatchObject({ email, displayName: 'New Analyst', role: 'investigator' });
    const short = await send(v, 'post', '/api/auth/accept-invite', { token, password: 'too short' });
    expect(short.status).toBe(400);
    expect(short.body.error.fields[0].path).toBe('password');
    const accepted = await send(v, 'post', '/api/auth/accept-invite', { token, password: 'a long enough passphrase' });
    expect(accepted.status).toBe(200);
    const again = await send(v, 'post', '/api/auth/accept-invite', { token, password: 'another long passphrase' });
    expect(again.status).toBe(410);
    expect(again.body.error.code).toBe('invite_invalid');
    expect((await send(v, 'post', '/api/auth/invite', { token })).status).toBe(410);

    const me = await signIn(ts, email, 'a long enough passphrase');
    expect((await me.agent.get('/api/auth/me').expect(200)).body.user.role).toBe('investigator');
    await expect(signIn(ts, email, 'another long passphrase')).rejects.toThrow(/401/);
  });

  it('refuses an expired link, and a resent link replaces the old one', async () => {
    const email = `late-analyst-${Date.now()}@staff.demo.test`;
    const created = await send(admin, 'post', '/api/admin/users', { email, displayName: 'Late Analyst', role: 'supervisor' });
    const first = decodeURIComponent(tokenOf((await findMail((m) => m.to.includes(email))).text)!);
    await ts.server.db.sequelize.query('UPDATE user_invites SET expires_at = DATE_SUB(UTC_TIMESTAMP(3), INTERVAL 1 MINUTE) WHERE token_hash = ?', {
      replacements: [createHash('sha256').update(first).digest('hex')],
      type: QueryTypes.UPDATE,
    });
    const v = await visitor();
    expect((await send(v, 'post', '/api/auth/accept-invite', { token: first, password: 'a long enough passphrase' })).status).toBe(410);
    await send(admin, 'post', `/api/admin/users/${created.body.user.id}/invite`).expect(204);
    const second = await findMail((m) => m.to.includes(email) && !!tokenOf(m.text) && decodeURIComponent(tokenOf(m.text)!) !== first);
    const fresh = decodeURIComponent(tokenOf(second.text)!);
    expect((await send(v, 'post', '/api/auth/accept-invite', { token: fresh, password: 'a long enough passphrase' })).status).toBe(200);
    expect((await send(admin, 'post', '/api/admin/users', { email, displayName: 'Late Analyst', role: 'supervisor' })).status).toBe(400);
  });
});

describe('deactivation, roles, lock-out', () => {
  it('ends a live socket at once and the next API call is 401', async () => {
    const p = await newPerson(ts, 'investigator', 'Leaving Investigator');
    const socket = await liveSocket(ts, p);
    const ended = new Promise<{ reason: string }>((resolve) => socket.on('session:ended', resolve));
    const disconnected = new Promise<void>((resolve) => socket.on('disconnect', () => resolve()));
    await p.agent.get('/api/cases').expect(200);
    const res = await send(admin, 'post', `/api/admin/users/${p.id}/deactivate`);
    expect(res.status).toBe(200);
    expect((await ended).reason).toBe('deactivated');
    await disconnected;
    socket.close();
    const next = await p.agent.get('/api/cases');
    expect(next.status).toBe(401);
    const [{ n }] = await q<{ n: number }>('SELECT COUNT(*) AS n FROM sessions WHERE user_id = ?', [p.id]);
    expect(Number(n)).toBe(0);
    await expect(signIn(ts, p.email)).rejects.toThrow(/401/);
    const users = (await admin.agent.get('/api/admin/users').expect(200)).body.users;
    expect(users.find((u: { id: number }) => u.id === p.id).status).toBe('deactivated');
    // Nobody deactivates or demotes themselves.
    expect((await send(admin, 'post', `/api/admin/users/${admin.id}/deactivate`)).status).toBe(409);
    expect((await send(admin, 'patch', `/api/admin/users/${admin.id}`, { role: 'investigator' })).status).toBe(409);
  });

  it('changes a role and signs the person out everywhere', async () => {
    const p = await newPerson(ts, 'investigator', 'Promoted Investigator');
    await send(admin, 'patch', `/api/admin/users/${p.id}`, { role: 'supervisor' }).expect(204);
    expect((await p.agent.get('/api/auth/me')).status).toBe(401);
    const again = await signIn(ts, p.email);
    expect((await again.agent.get('/api/auth/me').expect(200)).body.user.role).toBe('supervisor');
    const [audit] = await q<{ details: string }>("SELECT details FROM audit_log WHERE action = 'user.role' AND target_id = ? ORDER BY id DESC LIMIT 1", [String(p.id)]);
    expect(JSON.parse(audit.details)).toMatchObject({ from: 'investigator', to: 'supervisor' });
  });

  it('lifts a sign-in lock-out', async () => {
    const p = await newPerson(ts, 'investigator', 'Forgetful Investigator');
    const v = await visitor();
    for (let i = 0; i < ts.server.config.LOGIN_MAX_FAILURES_PER_ACCOUNT + 1; i += 1) {
      await send(v, 'post', '/api/auth/login', { email: p.email, password: 'not the password' });
    }
    const locked = await send(v, 'post', '/api/auth/login', { email: p.email, password: 'demo-password' });
    expect(locked.status).toBe(423);
    const listed = (await admin.agent.get('/api/admin/users').expect(200)).body.users.find((u: { id: number }) => u.id === p.id);
    expect(listed.lockedUntil).not.toBeNull();
    await send(admin, 'post', `/api/admin/users/${p.id}/unlock`).expect(204);
    expect((await send(v, 'post', '/api/auth/login', { email: p.email, password: 'demo-password' })).status).toBe(200);
  });
});

describe('API keys', () => {
  it('shows a new key once, lets it send transactions, and stops it when revoked', async () => {
    const created = await send(admin, 'post', '/api/admin/api-keys', { name: 'Card processor test', scopes: ['transactions:write'] });
    expect(created.status).toBe(201);
    const key = created.body.key as string;
    expect(key).toMatch(/^ek_[A-Za-z0-9_-]{40,}$/);
    expect(created.body.apiKey.keyPrefix).toBe(key.slice(0, 8));
    const list = await admin.agent.get('/api/admin/api-keys').expect(200);
    expect(JSON.stringify(list.body)).not.toContain(key);
    const [{ key_hash }] = await q<{ key_hash: string }>('SELECT key_hash FROM api_keys WHERE id = ?', [created.body.apiKey.id]);
    expect(key_hash).toBe(createHash('sha256').update(key).digest('hex'));
    const audit = await q<{ details: string }>("SELECT details FROM audit_log WHERE action = 'apikey.create' ORDER BY id DESC LIMIT 1");
    expect(audit[0].details).not.toContain(key);

    const ok = await request(ts.server.http).post('/api/v1/transactions').set('Authorization', `Bearer ${key}`).send(txn({}, 424_242));
    expect(ok.status).toBe(202);
    // A key in use (so cached by the server) is refused from the next request after its revocation.
    expect((await send(admin, 'post', `/api/admin/api-keys/${created.body.apiKey.id}/revoke`)).status).toBe(200);
    const afterRevoke = await request(ts.server.http).post('/api/v1/transactions').set('Authorization', `Bearer ${key}`).send(txn({}, 424_244));
    expect(afterRevoke.status).toBe(401);
    // A second key, revoked before its first use.
    const other = await send(admin, 'post', '/api/admin/api-keys', { name: 'Retired processor', scopes: ['transactions:write'] });
    const revoked = await send(admin, 'post', `/api/admin/api-keys/${other.body.apiKey.id}/revoke`);
    expect(revoked.status).toBe(200);
    expect(revoked.body.apiKeys.find((k: { id: number }) => k.id === other.body.apiKey.id).revokedAt).not.toBeNull();
    const refused = await request(ts.server.http).post('/api/v1/transactions').set('Authorization', `Bearer ${other.body.key}`).send(txn({}, 424_243));
    expect(refused.status).toBe(401);
    expect((await send(admin, 'post', `/api/admin/api-keys/${other.body.apiKey.id}/revoke`)).status).toBe(409);
    const sup = await signIn(ts, 'supervisor@demo.test');
    expect((await sup.agent.get('/api/admin/api-keys')).status).toBe(403);
  });

  it('a revocation reaches every web server: a second server that has the key cached refuses it too', async () => {
    // A second web server on the same database and event bus, as behind a load balancer.
    const second = await startTestServer({ REDIS_PREFIX: ts.server.config.REDIS_PREFIX });
    closers.push(() => second.close());
    const created = await send(admin, 'post', '/api/admin/api-keys', { name: 'Two-server processor', scopes: ['transactions:write'] });
    const key = created.body.key as string;
    const viaSecond = (seed: number) => request(second.server.http).post('/api/v1/transactions').set('Authorization', `Bearer ${key}`).send(txn({}, seed));
    expect((await viaSecond(424_250)).status).toBe(202);
    expect((await send(admin, 'post', `/api/admin/api-keys/${created.body.apiKey.id}/revoke`)).status).toBe(200);
    // The event travels through Redis; well inside the 30 s the cache would otherwise keep the key.
    const began = Date.now();
    let seed = 424_251;
    await waitFor(async () => (await viaSecond(seed++)).status === 401, 5_000);
    expect(Date.now() - began).toBeLessThan(5_000);
  });
});
