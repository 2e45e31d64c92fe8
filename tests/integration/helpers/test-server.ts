import { randomUUID } from 'node:crypto';
import request from 'supertest';
import { io as ioClient, type Socket } from 'socket.io-client';
import { createEdgecaseServer, type EdgecaseServer } from '../../../server/src/app';
import { DEMO_ACCOUNTS } from '../../../server/src/demo/demo-accounts';
import type { Role } from '../../../shared/src/auth/roles';

export const DEMO_PASSWORD = 'demo-password';

export interface TestServer {
  server: EdgecaseServer;
  baseUrl: string;
  close(): Promise<void>;
}

/**
 * Starts the real server (the same factory the entry point uses) on a free
 * port against the test database, with a Redis prefix of its own so rate-limit
 * counters of one test never leak into another.
 */
export async function startTestServer(env: Partial<NodeJS.ProcessEnv> = {}): Promise<TestServer> {
  const server = createEdgecaseServer({ EDGECASE_MODE: 'test', REDIS_PREFIX: `t-${randomUUID().slice(0, 8)}`, LOG_LEVEL: 'silent', ...env });
  const port = await server.listen(0, '127.0.0.1');
  return { server, baseUrl: `http://127.0.0.1:${port}`, close: () => server.close() };
}

export type Agent = ReturnType<typeof request.agent>;

export async function csrfToken(agent: Agent): Promise<string> {
  const res = await agent.get('/api/auth/csrf').expect(200);
  return res.body.csrfToken as string;
}

/** Signs in through the real route; returns the agent (cookies kept) and its current CSRF token. */
export async function signedInAgent(ts: TestServer, who: Role | string): Promise<{ agent: Agent; csrf: string }> {
  const email = who.includes('@') ? who : DEMO_ACCOUNTS.find((a) => a.role === who)!.email;
  const agent = request.agent(ts.server.http);
  const token = await csrfToken(agent);
  const res = await agent.post('/api/auth/login').set('X-CSRF-Token', token).send({ email, password: DEMO_PASSWORD });
  if (res.status !== 200) throw new Error(`sign-in of ${email} failed: ${res.status} ${JSON.stringify(res.body)}`);
  return { agent, csrf: res.body.csrfToken as string };
}

/** The session cookie an agent holds, as a Cookie header value. */
export function sessionCookieOf(res: request.Response): string | undefined {
  const raw = res.headers['set-cookie'] as unknown as string[] | undefined;
  const c = raw?.find((h) => h.startsWith('edgecase.sid='));
  return c?.split(';')[0];
}

export function connectSocket(baseUrl: string, cookie?: string): Socket {
  return ioClient(baseUrl, {
    transports: ['websocket'],
    reconnection: false,
    extraHeaders: cookie ? { Cookie: cookie } : {},
    forceNew: true,
  });
}
