import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { API_KEY_SCOPE_LIST } from '../../shared/src/api/admin';
import { ROLES, type Role } from '../../shared/src/auth/roles';
import { DEMO_API_KEY } from '../../server/src/demo/demo-accounts';
import { csrfToken, signedInAgent, startTestServer, type TestServer, type Agent } from './helpers/test-server';
import { installChampion } from './helpers/champion';

type Scope = (typeof API_KEY_SCOPE_LIST)[number];
type Policy = 'anyone' | 'signed-in' | Role[] | { apiKey: Scope };

/**
 * Who may call what, written out by hand. The probes are generated from the
 * routes the server actually mounted (`ts.server.routes`), each called as
 * every role, as nobody, and with an API key: a mounted route missing here
 * fails, and so does any answer that disagrees with this table.
 * `anyone` = no session needed; `signed-in` = every staff role;
 * `{ apiKey: scope }` = upstream systems holding that key scope only: no staff
 * session gets in, whatever its role, and a key without the scope is refused.
 * Staff routes take sessions only: an API key is not a session.
 */
const EXPECTED: Record<string, Policy> = {
  'POST /v1/transactions': { apiKey: 'transactions:write' },
  'GET /v1/transactions/:id': { apiKey: 'transactions:read' },
  'POST /v1/decisions': { apiKey: 'decisions:write' },
  'GET /health': 'anyone',
  'GET /auth/csrf': 'anyone',
  'POST /auth/login': 'anyone',
  'GET /auth/me': 'signed-in',
  'POST /auth/logout': 'signed-in',
  'GET /demo/info': 'anyone',
  'GET /demo/mail': 'signed-in',
  'GET /demo/mail/:id': 'signed-in',
  'GET /cases': ['investigator', 'supervisor'],
  'GET /cases/:id': ['investigator', 'supervisor'],
  'POST /cases/:id/claim': ['investigator', 'supervisor'],
  'POST /cases/:id/release': ['investigator', 'supervisor'],
  'POST /cases/:id/status': ['investigator', 'supervisor'],
  'POST /cases/:id/escalate': ['investigator', 'supervisor'],
  'POST /cases/:id/notes': ['investigator', 'supervisor'],
  'POST /cases/:id/evidence': ['investigator', 'supervisor'],
  'GET /cases/:id/evidence/:evidenceId': ['investigator', 'supervisor'],
  'POST /cases/:id/contact': ['investigator', 'supervisor'],
  'POST /cases/:id/card': ['investigator', 'supervisor'],
  'POST /cases/:id/disposition': ['investigator', 'supervisor'],
  'GET /queue/views': ['investigator', 'supervisor'],
  'PUT /queue/views': ['investigator', 'supervisor'],
  'GET /models/:id/scoring-model': ['investigator', 'supervisor'],
  'GET /demo/feed': ['admin'],
  'PUT /demo/feed': ['admin'],
  'POST /backfill/transactions': ['data_scientist', 'admin'],
  'GET /backfill': ['data_scientist', 'admin'],
  'GET /backfill/:id': ['data_scientist', 'admin'],
  'GET /backfill/:id/errors.csv': ['data_scientist', 'admin'],
  'GET /models': ['data_scientist', 'supervisor'],
  'GET /models/compare': ['data_scientist', 'supervisor'],
  'GET /models/shadow': ['data_scientist', 'supervisor'],
  'GET /models/:id': ['data_scientist', 'supervisor'],
  'GET /promotions': ['data_scientist', 'supervisor'],
  'POST /promotions': ['data_scientist'],
  'POST /promotions/:id/decision': ['supervisor'],
  'POST /promotions/:id/withdraw': ['data_scientist'],
  'GET /training/runs': ['data_scientist', 'supervisor'],
  'POST /training/runs': ['data_scientist'],
  'GET /training/runs/:id': ['data_scientist', 'supervisor'],
  'POST /training/runs/:id/cancel': ['data_scientist'],
  'GET /training/schedule': ['data_scientist', 'supervisor'],
  'PUT /training/schedule': ['data_scientist'],
  'GET /drift/reports': ['data_scientist', 'supervisor'],
  'POST /drift/reports': ['data_scientist'],
  'GET /labels/coverage': ['data_scientist', 'supervisor'],
  'GET /labels/delay': ['data_scientist', 'supervisor'],
  'POST /labels/imports': ['data_scientist', 'admin'],
  'GET /labels/imports': ['data_scientist', 'admin'],
  'GET /labels/imports/:id/errors.csv': ['data_scientist', 'admin'],
  'GET /board': ['supervisor'],
  'POST /cases/reassign': ['supervisor'],
  'GET /settings/supervision': ['investigator', 'supervisor'],
  'GET /settings/threshold-curve': ['supervisor'],
  'PUT /settings/threshold': ['supervisor'],
  'PUT /settings/sla': ['supervisor'],
  'PUT /settings/approval-limit': ['supervisor'],
  'GET /routing': ['supervisor'],
  'POST /routing/groups': ['supervisor'],
  'PUT /routing/groups/:id': ['supervisor'],
  'DELETE /routing/groups/:id': ['supervisor'],
  'PUT /routing/rules': ['supervisor'],
  'POST /routing/preview': ['supervisor'],
  'GET /approvals': ['supervisor'],
  'POST /approvals/:id/approve': ['supervisor'],
  'POST /approvals/:id/reject': ['supervisor'],
  'GET /admin/users': ['admin'],
  'POST /admin/users': ['admin'],
  'POST /admin/users/:id/invite': ['admin'],
  'PATCH /admin/users/:id': ['admin'],
  'POST /admin/users/:id/deactivate': ['admin'],
  'POST /admin/users/:id/unlock': ['admin'],
  'POST /auth/invite': 'anyone',
  'POST /auth/accept-invite': 'anyone',
  'GET /admin/api-keys': ['admin'],
  'POST /admin/api-keys': ['admin'],
  'POST /admin/api-keys/:id/revoke': ['admin'],
  'GET /audit': ['supervisor', 'admin'],
  'GET /audit/facets': ['supervisor', 'admin'],
  'GET /audit/export.csv': ['supervisor', 'admin'],
  'POST /audit/verify': ['supervisor', 'admin'],
};

// Started before the tests are collected: the probes below are generated from what this server mounted.
const ts: TestServer = await startTestServer();
const agents = new Map<Role, { agent: Agent; csrf: string }>();
/** For each scope, a key holding every other scope (made through the admin route, as an admin would). */
const keysWithout = new Map<Scope, string>();

beforeAll(async () => {
  // A champion, so an allowed synchronous decision gets past "no model yet" (503) to the validation of its body.
  await installChampion(ts.server.db);
  for (const role of ROLES) agents.set(role, await signedInAgent(ts, role));
  const admin = agents.get('admin')!;
  for (const scope of API_KEY_SCOPE_LIST) {
    const res = await admin.agent
      .post('/api/admin/api-keys')
      .set('X-CSRF-Token', admin.csrf)
      .send({ name: `access test without ${scope}`, scopes: API_KEY_SCOPE_LIST.filter((s) => s !== scope) })
      .expect(201);
    keysWithout.set(scope, res.body.key as string);
  }
});
afterAll(async () => {
  await ts?.close();
});

const concretePath = (p: string) => `/api${p.replace(/:(\w+)/g, 'probe-$1')}`;
const isKeyPolicy = (p: Policy | undefined): p is { apiKey: Scope } => typeof p === 'object' && !Array.isArray(p);

/** Who calls: a staff session of a role, nobody, the demo key (every scope), or a key lacking the route's scope. */
type Caller = { kind: 'role'; role: Role } | { kind: 'nobody' } | { kind: 'key' } | { kind: 'key-without-scope' };
const callerName = (c: Caller) => (c.kind === 'role' ? c.role : c.kind === 'key' ? 'API key' : c.kind === 'key-without-scope' ? 'API key without the scope' : 'nobody');

function allowed(rule: Policy, caller: Caller): boolean {
  if (rule === 'anyone') return true;
  if (isKeyPolicy(rule)) return caller.kind === 'key';
  if (caller.kind !== 'role') return false;
  return rule === 'signed-in' || rule.includes(caller.role);
}

/** The refusal the table implies: staff routes refuse by session and role, ingest routes by key and scope. */
function refusal(rule: Policy, caller: Caller): { status: number; code: string } {
  if (isKeyPolicy(rule)) return caller.kind === 'key-without-scope' ? { status: 403, code: 'api_key_scope' } : { status: 401, code: 'api_key_missing' };
  return caller.kind === 'role' ? { status: 403, code: 'forbidden' } : { status: 401, code: 'unauthenticated' };
}

const mounted = ts.server.routes.map((r) => `${r.method.toUpperCase()} ${r.path}`);
const probes: { key: string; caller: Caller; who: string }[] = [];
for (const key of mounted) {
  const callers: Caller[] = [...ROLES.map((role): Caller => ({ kind: 'role', role })), { kind: 'nobody' }, { kind: 'key' }];
  if (isKeyPolicy(EXPECTED[key])) callers.push({ kind: 'key-without-scope' });
  for (const caller of callers) probes.push({ key, caller, who: callerName(caller) });
}

describe('route access table', () => {
  it('has an entry for every mounted route and none for a route that is not mounted', () => {
    expect([...mounted].sort()).toEqual(Object.keys(EXPECTED).sort());
  });

  it('probes every route as every role, nobody and an API key', () => {
    // Common practice: guard against a generator that silently produces nothing.
    expect(mounted.length).toBeGreaterThan(50);
    expect(probes.length).toBe(mounted.length * (ROLES.length + 2) + mounted.filter((k) => isKeyPolicy(EXPECTED[k])).length);
  });

  it.each(probes)('$key as $who', async ({ key, caller }) => {
    const rule = EXPECTED[key];
    expect(rule, `${key} is mounted but has no entry in EXPECTED`).toBeDefined();
    const [method, path] = key.split(' ') as [string, string];
    // Sign-out would end the shared session: give it a session of its own.
    const own = caller.kind === 'role' && key === 'POST /auth/logout' ? await signedInAgent(ts, caller.role) : null;
    const session = own ?? (caller.kind === 'role' ? agents.get(caller.role)! : null);
    const agent = session?.agent ?? request.agent(ts.server.http);
    const token = session?.csrf ?? (await csrfToken(agent));
    const url = concretePath(path);
    let req =
      method === 'GET'
        ? agent.get(url)
        : agent[method.toLowerCase() as 'post' | 'put' | 'patch' | 'delete'](url).set('X-CSRF-Token', token);
    if (caller.kind === 'key') req = req.set('Authorization', `Bearer ${DEMO_API_KEY}`);
    if (caller.kind === 'key-without-scope' && isKeyPolicy(rule)) req = req.set('Authorization', `Bearer ${keysWithout.get(rule.apiKey)}`);
    const res = method === 'GET' ? await req : await req.send({});
    const said = `${key} as ${callerName(caller)} answered ${res.status} ${JSON.stringify(res.body?.error ?? {})}`;
    if (allowed(rule, caller)) {
      expect([401, 403], said).not.toContain(res.status);
      expect(res.status, said).toBeLessThan(500);
    } else {
      const want = refusal(rule, caller);
      expect(res.status, said).toBe(want.status);
      expect(res.body.error.code, said).toBe(want.code);
    }
  });
});
