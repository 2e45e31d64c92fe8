import { mkdtemp, readdir, readFile } from 'node:fs/promises';
import { createServer, type AddressInfo } from 'node:net';
import { tmpdir } from 'node:os';
import path from 'node:path';
import request from 'supertest';
import type { Socket } from 'socket.io-client';
import { hashPassword } from '../../../server/src/auth/password';
import { createUser } from '../../../server/src/auth/user-repository';
import { startSmtpCatcher, type SmtpCatcherHandle } from '../../../scripts/services/smtp-catcher';
import type { Role } from '../../../shared/src/auth/roles';
import { connectSocket, csrfToken, DEMO_PASSWORD, sessionCookieOf, type Agent, type TestServer } from './test-server';
import { txn } from './transactions';

export async function waitFor<T>(fn: () => Promise<T | null | undefined | false>, timeoutMs = 15_000): Promise<T> {
  const end = Date.now() + timeoutMs;
  for (;;) {
    const v = await fn();
    if (v) return v;
    if (Date.now() > end) throw new Error('timed out waiting');
    await new Promise((r) => setTimeout(r, 100));
  }
}

export function freePort(): Promise<number> {
  return new Promise((resolve) => {
    const srv = createServer();
    srv.listen(0, '127.0.0.1', () => {
      const { port } = srv.address() as AddressInfo;
      srv.close(() => resolve(port));
    });
  });
}

export interface CapturedMail {
  to: string[];
  subject: string;
  text: string;
}

/** A local SMTP catcher on a free port writing to a fresh folder, and a way to wait for a message in it. */
export async function mailCatcher(): Promise<{ catcher: SmtpCatcherHandle; find: (match: (m: CapturedMail) => boolean) => Promise<CapturedMail> }> {
  const dir = await mkdtemp(path.join(tmpdir(), 'edgecase-sup-mail-'));
  const catcher = await startSmtpCatcher({ dir, port: await freePort() });
  const find = (match: (m: CapturedMail) => boolean) =>
    waitFor(async () => {
      for (const f of (await readdir(dir)).filter((n) => n.endsWith('.json'))) {
        const m = JSON.parse(await readFile(path.join(dir, f), 'utf8')) as CapturedMail;
        if (match(m)) return m;
      }
      return null;
    });
  return { catcher, find };
}

export interface Person {
  id: number;
  email: string;
  agent: Agent;
  csrf: string;
  cookie: string;
}

/** Signs in through the real route, keeping the session cookie for a socket. */
export async function signIn(ts: TestServer, email: string, password = DEMO_PASSWORD): Promise<Person> {
  const agent = request.agent(ts.server.http);
  const token = await csrfToken(agent);
  const res = await agent.post('/api/auth/login').set('X-CSRF-Token', token).send({ email, password });
  if (res.status !== 200) throw new Error(`sign-in of ${email} failed: ${res.status} ${JSON.stringify(res.body)}`);
  return { id: res.body.user.id as number, email, agent, csrf: res.body.csrfToken as string, cookie: sessionCookieOf(res)! };
}

let people = 0;
/** A fresh staff member with the demo password, signed in. */
export async function newPerson(ts: TestServer, role: Role, name = `Test ${role} ${people + 1}`): Promise<Person> {
  people += 1;
  const email = `${role}-${people}-${Date.now().toString(36)}@staff.demo.test`;
  await createUser(ts.server.db, { email, displayName: name, role, passwordHash: await hashPassword(DEMO_PASSWORD) });
  return signIn(ts, email);
}

export const send = (who: { agent: Agent; csrf: string }, method: 'post' | 'put' | 'patch' | 'delete', url: string, body: object = {}) =>
  who.agent[method](url).set('X-CSRF-Token', who.csrf).send(body);

/** A socket for a signed-in person, resolved once the server greeted it. */
export async function liveSocket(ts: TestServer, p: Person): Promise<Socket> {
  const socket = connectSocket(ts.baseUrl, p.cookie);
  await new Promise((resolve, reject) => {
    socket.on('hello', resolve);
    socket.on('connect_error', reject);
  });
  return socket;
}

let panSeed = 70_000;
/** Posts a transaction on a fresh card and waits until it is scored; returns its view. */
export async function postScored(ts: TestServer, key: string, amount: string, seed = (panSeed += 1)) {
  const t = txn({ amount }, seed);
  await request(ts.server.http).post('/api/v1/transactions').set('Authorization', `Bearer ${key}`).send(t).expect(202);
  return waitFor(async () => {
    const r = await request(ts.server.http).get(`/api/v1/transactions/${t.id}`).set('Authorization', `Bearer ${key}`);
    return r.body.transaction?.status === 'scored'
      ? (r.body.transaction as { transactionId: number; alerted: boolean; caseId: number | null; score: { probability: number } })
      : null;
  });
}

/** Posts a high-risk transaction on a fresh card and returns the id of the case it opened. */
export async function newCase(ts: TestServer, key: string, amount = '2900.00'): Promise<number> {
  const v = await postScored(ts, key, amount);
  if (!v.caseId) throw new Error(`a ${amount} transaction did not alert (p = ${v.score.probability})`);
  return v.caseId;
}
