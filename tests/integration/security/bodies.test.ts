import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import type { RouteSpec } from '../../../server/src/access/route-table';
import { DEMO_API_KEY } from '../../../server/src/demo/demo-accounts';
import { installChampion } from '../helpers/champion';
import { csrfToken, startTestServer, type TestServer } from '../helpers/test-server';
import { isApiKeyRoute, isErrorBody, isStateChanging, label, MULTIPART_ROUTES, roleFor, sessionsPerRole, urlOf, type Session } from './helpers';

/**
 * Hostile request bodies on every route that takes JSON, from the route
 * table: the answer is a 4xx in the project's error shape, never a 5xx
 * (OWASP ASVS 4.0 V5.1.1 input validation, V13.1.1 API input, V7.4.1 generic
 * error messages; the JSON limit is express.json's 2 MB set in server/src/app.ts).
 */
const LIMIT_BYTES = 2 * 1024 * 1024;
let ts: TestServer;
let session: ReturnType<typeof sessionsPerRole>;

beforeAll(async () => {
  ts = await startTestServer();
  session = sessionsPerRole(ts);
  // The decision route answers 503 until a champion model is active; with one it reads its body like any other.
  await installChampion(ts.server.db);
});
afterAll(async () => {
  await ts?.close();
});

/** Every route with a body that express.json reads: state-changing, not multipart. Sign-out goes last (it ends the session). */
function jsonRoutes(): RouteSpec[] {
  const routes = ts.server.routes.filter((r) => isStateChanging(r) && !MULTIPART_ROUTES.has(label(r)));
  return [...routes.filter((r) => r.path !== '/auth/logout'), ...routes.filter((r) => r.path === '/auth/logout')];
}

/** A request as the route's rightful caller: the API key, a signed-in role allowed there, or an anonymous session with its token. */
async function caller(spec: RouteSpec): Promise<(contentType: string, body: string) => Promise<request.Response>> {
  let who: Session | null = null;
  if (!isApiKeyRoute(spec)) {
    const role = roleFor(spec.access);
    if (role) who = await session(role);
    else {
      const agent = request.agent(ts.server.http);
      who = { agent, csrf: await csrfToken(agent) };
    }
  }
  return (contentType, body) => {
    const req = (who ? who.agent : request(ts.server.http))[spec.method](urlOf(spec)).set('Content-Type', contentType);
    if (who) req.set('X-CSRF-Token', who.csrf);
    else req.set('Authorization', `Bearer ${DEMO_API_KEY}`);
    return req.send(body);
  };
}

const deep = (depth: number) => `${'{"a":'.repeat(depth)}1${'}'.repeat(depth)}`;
const deepArray = (depth: number) => `${'['.repeat(depth)}${']'.repeat(depth)}`;
// Just under the size limit: a top-level array of a million numbers, and the array fields routes take, 200,000 numbers each.
const hugeArray = `[${'0,'.repeat(Math.floor((LIMIT_BYTES - 16) / 2))}0]`;
const ARRAY_FIELDS = ['text', 'views', 'caseIds', 'transactions', 'rules'];
const hugeFields = `{${ARRAY_FIELDS.map((f) => `"${f}":[${'0,'.repeat(Math.floor(LIMIT_BYTES / 2 / ARRAY_FIELDS.length) - 64)}0]`).join(',')}}`;
const POLLUTING = [
  '{"__proto__":{"polluted":"yes","isAdmin":true}}',
  '{"constructor":{"prototype":{"polluted":"yes"}}}',
  '{"__proto__":{"toString":"x"},"text":{"__proto__":{"polluted":"yes"}},"views":[{"__proto__":{"polluted":"yes"}}]}',
];

interface Outcome {
  status: number;
  body: unknown;
}
const describeOutcome = (spec: RouteSpec, what: string, o: Outcome) => `${label(spec)} ${what}: ${o.status} ${JSON.stringify(o.body).slice(0, 120)}`;

describe('request bodies on every JSON route', () => {
  it('covers the routes: every state-changing route but the three multipart uploads', () => {
    expect(hugeArray.length).toBeLessThan(LIMIT_BYTES);
    expect(hugeFields.length).toBeLessThan(LIMIT_BYTES);
    expect(jsonRoutes().length).toBeGreaterThan(40);
    for (const m of MULTIPART_ROUTES) expect(ts.server.routes.map(label)).toContain(m);
  });

  it('answers malformed JSON with 400 malformed_json and a body over 2 MB with 413, in the error shape', async () => {
    const tooBig = JSON.stringify({ text: 'x'.repeat(LIMIT_BYTES + 1) });
    const failures: string[] = [];
    for (const spec of jsonRoutes()) {
      const send = await caller(spec);
      for (const [what, body, status, code] of [
        ['malformed', '{"text": "unterminated', 400, 'malformed_json'],
        ['truncated', '{"a":[1,2', 400, 'malformed_json'],
        ['over the limit', tooBig, 413, 'payload_too_large'],
      ] as const) {
        const res = await send('application/json', body);
        if (res.status !== status || !isErrorBody(res.body) || res.body.error.code !== code) failures.push(describeOutcome(spec, what, res));
      }
    }
    expect(failures).toEqual([]);
  });

  it('refuses wrong content types, deep nesting, huge arrays and prototype-pollution keys with a 4xx wherever the route reads a body, and never answers 5xx', async () => {
    const failures: string[] = [];
    let reading = 0;
    for (const spec of jsonRoutes()) {
      const send = await caller(spec);
      // Does the route read its body at all? An empty object tells: a route that validates one refuses it.
      const empty = await send('application/json', '{}');
      const readsBody = empty.status >= 400 && empty.status < 500;
      if (readsBody) reading += 1;
      const hostile: [string, string, string][] = [
        ['as text/plain', 'text/plain', '{"text":"hello"}'],
        ['as application/xml', 'application/xml', '<text>hello</text>'],
        ['as form data', 'application/x-www-form-urlencoded', 'text=hello'],
        ['in an unsupported charset', 'application/json; charset=utf-7', '{"text":"hello"}'],
        // Deeper than a recursive parser or serialiser survives on Node's default stack (about 10,000 frames; common practice).
        ['nested 20,000 deep', 'application/json', deep(20_000)],
        ['arrays nested 50,000 deep', 'application/json', deepArray(50_000)],
        ['as a huge top-level array', 'application/json', hugeArray],
        ['with huge arrays in its fields', 'application/json', hugeFields],
        ...POLLUTING.map((b, i): [string, string, string] => [`with prototype keys #${i + 1}`, 'application/json', b]),
      ];
      for (const [what, type, body] of hostile) {
        const res = await send(type, body);
        const refused = res.status >= 400 && res.status < 500;
        if (res.status >= 500 || (readsBody && !refused) || (refused && !isErrorBody(res.body))) failures.push(describeOutcome(spec, what, res));
      }
    }
    expect(failures).toEqual([]);
    // Most routes validate a body (or an id first): the 4xx rule above held for them, not just "no 5xx".
    expect(reading).toBeGreaterThan(35);
    // Nothing reached the prototype every object of this process shares (the test server runs in it).
    expect(({} as Record<string, unknown>).polluted).toBeUndefined();
    expect(({} as Record<string, unknown>).isAdmin).toBeUndefined();
    expect(typeof ({} as object).toString).toBe('function');
  });
});
