import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { ROLES, type Role } from '../../shared/src/auth/roles';
import { csrfToken, signedInAgent, startTestServer, type TestServer, type Agent } from './helpers/test-server';

/**
 * Who may call what, written out by hand. The test fails when a mounted route
 * is missing here (so a new route cannot skip this table) and when the server
 * lets a role in that the table keeps out, or the other way round.
 * `anyone` = no session needed; `signed-in` = every staff role; `api-key` =
 * upstream systems only: no staff session gets in, whatever its role.
 */
const EXPECTED: Record<string, 'anyone' | 'signed-in' | 'api-key' | Role[]> = {
  'POST /v1/transactions': 'api-key',
  'GET /v1/transactions/:id': 'api-key',
  'POST /v1/decisions': 'api-key',
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

let ts: TestServer;
const agents = new Map<Role, { agent: Agent; csrf: string }>();

beforeAll(async () => {
  ts = await startTestServer();
  for (const role of ROLES) agents.set(role, await signedInAgent(ts, role));
});
afterAll(async () => {
  await ts?.close();
});

const concretePath = (p: string) => `/api${p.replace(/:(\w+)/g, 'probe-$1')}`;

function allowed(rule: (typeof EXPECTED)[string], role: Role | null): boolean {
  if (rule === 'anyone') return true;
  if (rule === 'api-key') return false;
  if (role === null) return false;
  return rule === 'signed-in' || rule.includes(role);
}

describe('route access table', () => {
  it('lists every mounted route', () => {
    const mounted = ts.server.routes.map((r) => `${r.method.toUpperCase()} ${r.path}`).sort();
    expect(mounted).toEqual(Object.keys(EXPECTED).sort());
  });

  const cases: { key: string; role: Role | null }[] = [];
  for (const key of Object.keys(EXPECTED)) {
    for (const role of [...ROLES, null]) cases.push({ key, role });
  }

  it.each(cases)('$key as $role', async ({ key, role }) => {
    const [method, path] = key.split(' ') as [string, string];
    // Sign-out would end the shared session: give it a session of its own.
    const own = role && key === 'POST /auth/logout' ? await signedInAgent(ts, role) : null;
    const session = own ?? (role ? agents.get(role)! : null);
    const agent = session?.agent ?? request.agent(ts.server.http);
    const token = session?.csrf ?? (await csrfToken(agent));
    const url = concretePath(path);
    const req =
      method === 'GET'
        ? agent.get(url)
        : agent[method.toLowerCase() as 'post' | 'put' | 'patch' | 'delete'](url).set('X-CSRF-Token', token).send({});
    const res = await req;
    if (allowed(EXPECTED[key], role)) {
      expect([401, 403], `${key} as ${role ?? 'nobody'} answered ${res.status}`).not.toContain(res.status);
      expect(res.status).toBeLessThan(500);
    } else if (EXPECTED[key] === 'api-key') {
      expect(res.status).toBe(401);
      expect(res.body.error.code).toBe('api_key_missing');
    } else {
      expect(res.status).toBe(role === null ? 401 : 403);
      expect(res.body.error.code).toBe(role === null ? 'unauthenticated' : 'forbidden');
    }
  });
});
