import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { QueryTypes } from 'sequelize';
import { createApiKey } from '../../server/src/api-keys/api-key-repository';
import { createScoringWorker } from '../../workers/src/scoring.worker';
import { startTestServer, type TestServer } from './helpers/test-server';
import { installChampion } from './helpers/champion';
import { txn } from './helpers/transactions';
import { newPerson, send, signIn, waitFor, type Person } from './helpers/supervision-kit';

/**
 * Teams against the stated policy: a supervisor sees every case; an
 * investigator sees the shared queue (cases without a team), their teams'
 * cases and cases assigned to them, and nothing else: not in the queue, not
 * in its counts, not in the case file, its evidence, its related cases or any
 * case action. A case they may not see answers exactly like a case that does
 * not exist (RFC 9110 §15.5.4: a server may answer 404 to hide that a resource
 * exists; OWASP ASVS 4.0.3 V4.2.1: records protected against direct object
 * references), and each refusal is audited (ASVS 4.0.3 V7.2.2: failed access
 * control decisions are logged).
 */

let ts: TestServer;
let key: string;
let sup: Person;
/** Team A has two members, team B one, team C none; `outsider` is in no team. */
let invA: Person;
let invA2: Person;
let invB: Person;
let outsider: Person;
const team = { A: 0, B: 0, C: 0 };
const caseIds = { A1: 0, A2: 0, B: 0, C: 0, shared: 0 };
let evidenceA1 = 0;
let evidenceB = 0;
const closers: (() => Promise<unknown>)[] = [];

const q = <T extends object>(sql: string, replacements: unknown[] = []) => ts.server.db.sequelize.query<T>(sql, { replacements, type: QueryTypes.SELECT });

let panSeed = 81_000;
/** A high-risk transaction from a merchant in `country`, on a fresh card; the id of the case it opened. */
async function caseFrom(country: string, deviceId: string): Promise<number> {
  panSeed += 1;
  const t = txn({ amount: '2900.00', deviceId, merchant: { id: 'm-team', name: 'Team Test Merchant', mcc: '5411', country } }, panSeed);
  await request(ts.server.http).post('/api/v1/transactions').set('Authorization', `Bearer ${key}`).send(t).expect(202);
  return waitFor(async () => {
    const r = await request(ts.server.http).get(`/api/v1/transactions/${t.id}`).set('Authorization', `Bearer ${key}`);
    if (r.body.transaction?.status === 'scored' && !r.body.transaction.caseId) throw new Error('the transaction did not alert');
    return r.body.transaction?.caseId as number | undefined;
  });
}

async function caseRow(id: number) {
  const [c] = await q<{ team_id: number | null; assignee_id: number | null; status: string; version: number }>(
    'SELECT team_id, assignee_id, status, version FROM cases WHERE id = ?',
    [id],
  );
  return { ...c, team_id: c.team_id === null ? null : Number(c.team_id), assignee_id: c.assignee_id === null ? null : Number(c.assignee_id) };
}

const png = Buffer.concat([Buffer.from('89504e470d0a1a0a0000000d49484452000000010000000108060000001f15c489', 'hex'), Buffer.alloc(64)]);
const upload = (p: Person, caseId: number) => p.agent.post(`/api/cases/${caseId}/evidence`).set('X-CSRF-Token', p.csrf).attach('file', png, { filename: 'receipt.png', contentType: 'image/png' });

/** Ids the caller's queue lists for a search by case id (the same query and count the Queue screen uses). */
async function queueFind(p: Person, caseId: number): Promise<{ ids: number[]; total: number }> {
  const res = await p.agent.get(`/api/cases?q=${caseId}&pageSize=50`).expect(200);
  return { ids: res.body.items.map((c: { id: number }) => c.id), total: res.body.total as number };
}

async function deniedAudits(actor: Person, action: string, caseId: number) {
  const rows = await q<{ details: string }>("SELECT details FROM audit_log WHERE action = ? AND outcome = 'denied' AND actor_id = ? AND target_type = 'case' AND target_id = ?", [
    action,
    String(actor.id),
    String(caseId),
  ]);
  return rows.map((r) => JSON.parse(r.details) as Record<string, unknown>);
}

beforeAll(async () => {
  ts = await startTestServer();
  await installChampion(ts.server.db);
  key = (await createApiKey(ts.server.db, { name: 'teams it', scopes: ['transactions:write', 'transactions:read'] })).key;
  const scoring = await createScoringWorker(ts.server.config, ts.server.db, 2);
  closers.push(() => scoring.close());
  sup = await signIn(ts, 'supervisor@demo.test');
  invA = await newPerson(ts, 'investigator', 'Team A One');
  invA2 = await newPerson(ts, 'investigator', 'Team A Two');
  invB = await newPerson(ts, 'investigator', 'Team B One');
  outsider = await newPerson(ts, 'investigator', 'No Team');
  const stamp = Date.now().toString(36);
  const group = async (name: string, memberIds: number[]) => {
    const res = await send(sup, 'post', '/api/routing/groups', { name: `${name} ${stamp}`, strategy: 'round_robin', memberIds }).expect(201);
    return res.body.groups.find((g: { name: string }) => g.name === `${name} ${stamp}`).id as number;
  };
  team.A = await group('Germany desk', [invA.id, invA2.id]);
  team.B = await group('France desk', [invB.id]);
  team.C = await group('Empty desk', []);
  await send(sup, 'put', '/api/routing/rules', {
    rules: [
      { name: 'Germany', countries: ['DE'], groupId: team.A },
      { name: 'France', countries: ['FR'], groupId: team.B },
      { name: 'Netherlands', countries: ['NL'], groupId: team.C },
    ],
  }).expect(200);
  // A1 and B share a device: each is the other's related case.
  caseIds.A1 = await caseFrom('DE', 'dev-teams-shared');
  caseIds.A2 = await caseFrom('DE', 'dev-teams-a2');
  caseIds.B = await caseFrom('FR', 'dev-teams-shared');
  caseIds.C = await caseFrom('NL', 'dev-teams-c');
  caseIds.shared = await caseFrom('US', 'dev-teams-us');
  const holderOfA1 = (await caseRow(caseIds.A1)).assignee_id === invA.id ? invA : invA2;
  evidenceA1 = (await upload(holderOfA1, caseIds.A1).expect(201)).body.evidence.id as number;
  evidenceB = (await upload(invB, caseIds.B).expect(201)).body.evidence.id as number;
});

afterAll(async () => {
  // Leave the shared test database without routing, as other files expect it.
  if (sup) {
    await send(sup, 'put', '/api/routing/rules', { rules: [] });
    for (const id of Object.values(team)) if (id) await send(sup, 'delete', `/api/routing/groups/${id}`);
  }
  for (const c of closers) await c().catch(() => undefined);
  await ts?.close();
});

describe('routing sets the team', () => {
  it('puts each case in its rule’s team, with a member of it as holder; a team nobody can take from keeps the case unassigned', async () => {
    const a1 = await caseRow(caseIds.A1);
    const a2 = await caseRow(caseIds.A2);
    expect([a1.team_id, a2.team_id]).toEqual([team.A, team.A]);
    // Round-robin over the two members: one case each.
    expect(new Set([a1.assignee_id, a2.assignee_id])).toEqual(new Set([invA.id, invA2.id]));
    expect(await caseRow(caseIds.B)).toMatchObject({ team_id: team.B, assignee_id: invB.id });
    expect(await caseRow(caseIds.C)).toMatchObject({ team_id: team.C, assignee_id: null });
    expect(await caseRow(caseIds.shared)).toMatchObject({ team_id: null, assignee_id: null });
  });

  it('names the team in the case file and the queue', async () => {
    const file = await sup.agent.get(`/api/cases/${caseIds.A1}`).expect(200);
    expect(file.body.case.team).toEqual({ id: team.A, name: expect.stringMatching(/^Germany desk /) });
    const listed = await sup.agent.get(`/api/cases?q=${caseIds.B}`).expect(200);
    expect(listed.body.items[0].team).toEqual({ id: team.B, name: expect.stringMatching(/^France desk /) });
    expect((await sup.agent.get(`/api/cases/${caseIds.shared}`).expect(200)).body.case.team).toBeNull();
  });
});

describe('another team’s case', () => {
  it('is not in the queue or its counts', async () => {
    for (const id of [caseIds.A1, caseIds.A2, caseIds.C]) expect(await queueFind(invB, id), `case ${id}`).toEqual({ ids: [], total: 0 });
    expect(await queueFind(invB, caseIds.B)).toEqual({ ids: [caseIds.B], total: 1 });
    expect(await queueFind(invB, caseIds.shared)).toEqual({ ids: [caseIds.shared], total: 1 });
    // Whatever else is open: every case on the page is shared, B's, or held by B, and the count is of those alone.
    const page = await invB.agent.get('/api/cases?pageSize=200&view=all').expect(200);
    for (const c of page.body.items as { id: number; team: { id: number } | null; assignee: { id: number } | null }[]) {
      expect(c.team === null || c.team.id === team.B || c.assignee?.id === invB.id, `case ${c.id}`).toBe(true);
    }
    const all = await sup.agent.get('/api/cases?pageSize=1').expect(200);
    const [{ n: hidden }] = await q<{ n: number }>('SELECT COUNT(*) AS n FROM cases WHERE is_open = 1 AND team_id IS NOT NULL AND team_id <> ? AND NOT (assignee_id <=> ?)', [team.B, invB.id]);
    expect(Number(hidden)).toBeGreaterThanOrEqual(3);
    expect(page.body.total).toBe(all.body.total - Number(hidden));
  });

  it('answers the case file exactly as for a case that does not exist, and audits the refusal', async () => {
    const missing = await invB.agent.get('/api/cases/2147483000');
    const refused = await invB.agent.get(`/api/cases/${caseIds.A1}`);
    expect(refused.status).toBe(404);
    expect(refused.body).toEqual(missing.body);
    expect(await deniedAudits(invB, 'case.view', caseIds.A1)).toEqual([{ reason: 'not_visible' }]);
    // Members of the team see it, whoever holds it.
    for (const p of [invA, invA2]) await p.agent.get(`/api/cases/${caseIds.A1}`).expect(200);
    await outsider.agent.get(`/api/cases/${caseIds.A1}`).expect(404);
  });

  it('refuses its evidence, and evidence guessed onto one’s own case, auditing both', async () => {
    const refused = await invB.agent.get(`/api/cases/${caseIds.A1}/evidence/${evidenceA1}`);
    expect(refused.status).toBe(404);
    expect(refused.body.error.code).toBe('not_found');
    expect(refused.headers['content-disposition']).toBeUndefined();
    expect(await deniedAudits(invB, 'case.evidence_download', caseIds.A1)).toEqual([{ reason: 'not_visible', evidenceId: evidenceA1 }]);
    // Evidence belongs to its case: A1's evidence id on B's own case is refused like a missing one.
    const guessed = await invB.agent.get(`/api/cases/${caseIds.B}/evidence/${evidenceA1}`);
    const absent = await invB.agent.get(`/api/cases/${caseIds.B}/evidence/2147483000`);
    expect(guessed.status).toBe(404);
    expect(guessed.body).toEqual(absent.body);
    expect(await deniedAudits(invB, 'case.evidence_download', caseIds.B)).toEqual([{ evidenceId: evidenceA1, reason: 'not_on_this_case' }]);
    // Their own evidence on their own case still comes.
    await invB.agent.get(`/api/cases/${caseIds.B}/evidence/${evidenceB}`).expect(200);
    await invA2.agent.get(`/api/cases/${caseIds.A1}/evidence/${evidenceA1}`).expect(200);
  });

  it('refuses every case action, leaving the case as it was', async () => {
    const id = caseIds.A1;
    const before = await caseRow(id);
    const [{ n: notesBefore }] = await q<{ n: number }>('SELECT COUNT(*) AS n FROM case_notes WHERE case_id = ?', [id]);
    const [{ status: cardBefore }] = await q<{ status: string }>('SELECT k.status FROM cases c JOIN cards k ON k.id = c.card_id WHERE c.id = ?', [id]);
    // Valid bodies (shared/src/api/cases.ts), so a refusal can come only from the case rule.
    const bodies: Record<string, object> = {
      'POST /cases/:id/claim': {},
      'POST /cases/:id/release': {},
      'POST /cases/:id/status': { status: 'waiting_cardholder' },
      'POST /cases/:id/escalate': { reason: 'Looks like a ring' },
      'POST /cases/:id/notes': { text: 'Seen from another team' },
      'POST /cases/:id/contact': { subject: 'Your card', message: 'Please call us back today.' },
      'POST /cases/:id/card': { action: 'block', reason: 'Blocking from outside the team' },
      'POST /cases/:id/disposition': { disposition: 'legitimate', reason: 'Decided from outside the team', version: Number(before.version) },
    };
    // Every mounted route on one case, so a case route added later is checked too.
    const caseRoutes = ts.server.routes.filter((r) => r.path.startsWith('/cases/:id')).map((r) => `${r.method.toUpperCase()} ${r.path}`);
    expect(caseRoutes.length).toBeGreaterThanOrEqual(11);
    for (const route of caseRoutes) {
      const [method, path] = route.split(' ') as [string, string];
      const url = `/api${path.replace(':id', String(id)).replace(':evidenceId', String(evidenceA1))}`;
      let res: request.Response;
      if (method === 'GET') res = await invB.agent.get(url);
      else if (route === 'POST /cases/:id/evidence') res = await upload(invB, id);
      else {
        expect(bodies[route], `${route} needs a valid body in this test`).toBeDefined();
        res = await send(invB, 'post', url, bodies[route]);
      }
      expect({ route, status: res.status, message: res.body?.error?.message }).toEqual({ route, status: 404, message: 'No such case.' });
    }
    expect(await caseRow(id)).toEqual(before);
    expect((await q<{ n: number }>('SELECT COUNT(*) AS n FROM case_notes WHERE case_id = ?', [id]))[0].n).toBe(notesBefore);
    expect(Number((await q<{ n: number }>('SELECT COUNT(*) AS n FROM case_evidence WHERE case_id = ?', [id]))[0].n)).toBe(1);
    expect((await q<{ status: string }>('SELECT k.status FROM cases c JOIN cards k ON k.id = c.card_id WHERE c.id = ?', [id]))[0].status).toBe(cardBefore);
    const denied = await q<{ action: string }>("SELECT DISTINCT action FROM audit_log WHERE outcome = 'denied' AND actor_id = ? AND target_type = 'case' AND target_id = ?", [
      String(invB.id),
      String(id),
    ]);
    expect(denied.map((r) => r.action).sort()).toEqual(
      ['case.view', 'case.evidence_download', 'case.claim', 'case.release', 'case.status', 'case.escalate', 'case.note', 'case.evidence', 'case.contact', 'card.block', 'case.disposition'].sort(),
    );
  });

  it('is left out of the related cases of one’s own case', async () => {
    const own = await invB.agent.get(`/api/cases/${caseIds.B}`).expect(200);
    expect(own.body.related.map((r: { id: number }) => r.id)).not.toContain(caseIds.A1);
    const seenBySupervisor = await sup.agent.get(`/api/cases/${caseIds.B}`).expect(200);
    expect(seenBySupervisor.body.related.map((r: { id: number }) => r.id)).toContain(caseIds.A1);
  });
});

describe('supervisors and reassignment', () => {
  it('a supervisor sees both teams’ cases, their evidence and the team nobody takes from', async () => {
    for (const id of [caseIds.A1, caseIds.B, caseIds.C]) {
      await sup.agent.get(`/api/cases/${id}`).expect(200);
      expect(await queueFind(sup, id)).toEqual({ ids: [id], total: 1 });
    }
    await sup.agent.get(`/api/cases/${caseIds.A1}/evidence/${evidenceA1}`).expect(200);
    await sup.agent.get(`/api/cases/${caseIds.B}/evidence/${evidenceB}`).expect(200);
  });

  it('a case handed across teams opens to its new holder, and goes back to its team when they release it', async () => {
    const id = caseIds.A1;
    await send(sup, 'post', '/api/cases/reassign', { caseIds: [id], assigneeId: invB.id }).expect(200);
    const file = await invB.agent.get(`/api/cases/${id}`).expect(200);
    expect(file.body.case.team.id).toBe(team.A);
    await invB.agent.get(`/api/cases/${id}/evidence/${evidenceA1}`).expect(200);
    expect(await queueFind(invB, id)).toEqual({ ids: [id], total: 1 });
    await send(invB, 'post', `/api/cases/${id}/notes`, { text: 'Taking over from the Germany desk' }).expect(201);
    // The team still sees its case.
    await invA.agent.get(`/api/cases/${id}`).expect(200);

    const released = await send(invB, 'post', `/api/cases/${id}/release`).expect(200);
    expect(released.body.case).toMatchObject({ id, assignee: null, team: { id: team.A } });
    await invB.agent.get(`/api/cases/${id}`).expect(404);
    expect(await queueFind(invB, id)).toEqual({ ids: [], total: 0 });
    expect(await queueFind(invA2, id)).toEqual({ ids: [id], total: 1 });
  });

  it('a deleted team hands its cases back to the shared queue', async () => {
    await outsider.agent.get(`/api/cases/${caseIds.C}`).expect(404);
    await send(sup, 'put', '/api/routing/rules', {
      rules: [
        { name: 'Germany', countries: ['DE'], groupId: team.A },
        { name: 'France', countries: ['FR'], groupId: team.B },
      ],
    }).expect(200);
    await send(sup, 'delete', `/api/routing/groups/${team.C}`).expect(200);
    team.C = 0;
    expect((await caseRow(caseIds.C)).team_id).toBeNull();
    await outsider.agent.get(`/api/cases/${caseIds.C}`).expect(200);
    expect(await queueFind(outsider, caseIds.C)).toEqual({ ids: [caseIds.C], total: 1 });
  });
});
