import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { QueryTypes } from 'sequelize';
import type { Socket } from 'socket.io-client';
import { createApiKey } from '../../server/src/api-keys/api-key-repository';
import { insertModelVersion } from '../../server/src/model-registry/model-repository';
import { buildHistoryThresholdCurve } from '../../server/src/settings/threshold-curve';
import { compileModel, parseModel } from '../../shared/src/model/index';
import { createScoringWorker } from '../../workers/src/scoring.worker';
import { createMailWorker } from '../../workers/src/mail.worker';
import { startTestServer, type TestServer } from './helpers/test-server';
import { fixtureModel, installChampion } from './helpers/champion';
import { liveSocket, mailCatcher, newCase, newPerson, postScored, send, signIn, waitFor, type Person } from './helpers/supervision-kit';

let ts: TestServer;
let key: string;
let inv: Person;
let inv2: Person;
let sup: Person;
let sup2: Person;
let findMail: Awaited<ReturnType<typeof mailCatcher>>['find'];
const closers: (() => Promise<unknown>)[] = [];
const sockets: Socket[] = [];

const q = <T extends object>(sql: string, replacements: unknown[] = []) =>
  ts.server.db.sequelize.query<T>(sql, { replacements, type: QueryTypes.SELECT });

async function caseRow(id: number) {
  const [c] = await q<{ status: string; assignee_id: number | null; claimed_at: Date | null; sla_due_at: Date; created_at: Date; priority: string; version: number }>(
    'SELECT status, assignee_id, claimed_at, sla_due_at, created_at, priority, version FROM cases WHERE id = ?',
    [id],
  );
  return c;
}

async function labelsOf(caseId: number) {
  return q<{ label: string; created_by: number }>('SELECT label, created_by FROM labels WHERE case_id = ?', [caseId]);
}

async function version(caseId: number) {
  return Number((await caseRow(caseId)).version);
}

let defaults: { threshold: number; sla: { slaMinutes: Record<string, number>; priorityBands: Record<string, number> }; approvalLimit: number | null; dailyCapacity: number | null };

beforeAll(async () => {
  ts = await startTestServer();
  await installChampion(ts.server.db);
  key = (await createApiKey(ts.server.db, { name: 'supervision it', scopes: ['transactions:write', 'transactions:read'] })).key;
  const mail = await mailCatcher();
  findMail = mail.find;
  const scoring = await createScoringWorker(ts.server.config, ts.server.db, 2);
  const mailer = createMailWorker({ ...ts.server.config, SMTP_PORT: mail.catcher.port }, ts.server.db);
  closers.push(() => scoring.close(), () => mailer.close(), () => mail.catcher.stop());
  inv = await signIn(ts, 'investigator@demo.test');
  inv2 = await newPerson(ts, 'investigator', 'Second Investigator');
  sup = await signIn(ts, 'supervisor@demo.test');
  sup2 = await newPerson(ts, 'supervisor', 'Second Supervisor');
  const s = (await sup.agent.get('/api/settings/supervision').expect(200)).body;
  defaults = { threshold: s.threshold, sla: s.sla, approvalLimit: s.approvalLimit, dailyCapacity: s.dailyCapacity };
});

afterAll(async () => {
  // Leave the shared test database as other files expect it: default threshold, SLA, limit, no routing.
  if (sup && defaults) {
    await send(sup, 'put', '/api/settings/threshold', { threshold: defaults.threshold, dailyCapacity: defaults.dailyCapacity });
    await send(sup, 'put', '/api/settings/sla', defaults.sla);
    await send(sup, 'put', '/api/settings/approval-limit', { approvalLimit: defaults.approvalLimit });
    await send(sup, 'put', '/api/routing/rules', { rules: [] });
  }
  for (const s of sockets) s.close();
  for (const c of closers) await c().catch(() => undefined);
  await ts?.close();
});

describe('alert threshold', () => {
  it('takes effect on the next posted transaction, both ways, and is audited', async () => {
    // The fixture champion scores a 500.00 payment far below the default threshold of 0.5.
    const before = await postScored(ts, key, '500.00');
    expect(before.alerted).toBe(false);
    const p = before.score.probability;
    const lowered = Math.max(0.001, p / 2);
    const raised = Math.min(0.999, p * 1.5);
    expect(lowered).toBeLessThan(p);
    expect(raised).toBeGreaterThan(p);

    // Lower below it: the next such payment alerts.
    const put = await send(sup, 'put', '/api/settings/threshold', { threshold: lowered, dailyCapacity: 40 });
    expect(put.status).toBe(200);
    expect(put.body.threshold).toBeCloseTo(lowered, 12);
    expect(put.body.dailyCapacity).toBe(40);
    const afterLower = await postScored(ts, key, '500.00');
    expect(afterLower.score.probability).toBeGreaterThanOrEqual(lowered);
    expect(afterLower.alerted).toBe(true);
    expect(afterLower.caseId).not.toBeNull();
    const [stored] = await q<{ threshold: number }>('SELECT threshold FROM transaction_scores WHERE transaction_id = ?', [afterLower.transactionId]);
    expect(stored.threshold).toBeCloseTo(lowered, 12);

    // Raise above it again: the next one does not.
    await send(sup, 'put', '/api/settings/threshold', { threshold: raised, dailyCapacity: null }).expect(200);
    const afterRaise = await postScored(ts, key, '500.00');
    expect(afterRaise.score.probability).toBeLessThan(raised);
    expect(afterRaise.alerted).toBe(false);
    expect(afterRaise.caseId).toBeNull();

    await send(sup, 'put', '/api/settings/threshold', { threshold: defaults.threshold, dailyCapacity: null }).expect(200);
    const audits = await q<{ details: string }>("SELECT details FROM audit_log WHERE action = 'settings.threshold' ORDER BY id DESC LIMIT 3");
    expect(audits).toHaveLength(3);
    expect(JSON.parse(audits[2].details)).toMatchObject({ before: { threshold: defaults.threshold }, after: { threshold: lowered } });
    // Investigators may not touch it.
    expect((await send(inv, 'put', '/api/settings/threshold', { threshold: 0.4, dailyCapacity: null })).status).toBe(403);
  });

  it('refuses a threshold outside (0, 1)', async () => {
    const res = await send(sup, 'put', '/api/settings/threshold', { threshold: 1, dailyCapacity: 10 });
    expect(res.status).toBe(400);
    expect(res.body.error.fields[0].path).toBe('threshold');
  });
});

describe('bulk reassignment', () => {
  it('moves three cases in one go, audits each, tells both holders live and e-mails the new one', async () => {
    const ids = [await newCase(ts, key), await newCase(ts, key), await newCase(ts, key)];
    await send(inv, 'post', `/api/cases/${ids[0]}/claim`).expect(200);
    const oldSocket = await liveSocket(ts, inv);
    const newSocket = await liveSocket(ts, inv2);
    sockets.push(oldSocket, newSocket);
    const heardByOld: { caseId: number; assigneeId: number; previousAssigneeId: number | null }[] = [];
    const heardByNew: typeof heardByOld = [];
    oldSocket.on('queue:case-changed', (e) => heardByOld.push(e));
    newSocket.on('queue:case-changed', (e) => heardByNew.push(e));

    const res = await send(sup, 'post', '/api/cases/reassign', { caseIds: ids, assigneeId: inv2.id, note: 'Covering for the afternoon' });
    expect(res.status).toBe(200);
    expect(res.body.cases.map((c: { id: number }) => c.id).sort()).toEqual([...ids].sort());
    expect(res.body.cases.every((c: { assignee: { id: number } }) => c.assignee.id === inv2.id)).toBe(true);
    for (const id of ids) expect(Number((await caseRow(id)).assignee_id)).toBe(inv2.id);
    // The claimed case stays claimed, now by the new holder; the others wait in their queue.
    expect((await caseRow(ids[0])).status).toBe('claimed');

    const audits = await q<{ target_id: string; details: string; actor_id: string }>(
      "SELECT target_id, details, actor_id FROM audit_log WHERE action = 'case.reassign' AND target_id IN (?) ORDER BY id",
      [ids.map(String)],
    );
    expect(audits.map((a) => Number(a.target_id)).sort()).toEqual([...ids].sort());
    const first = audits.find((a) => Number(a.target_id) === ids[0])!;
    expect(JSON.parse(first.details)).toMatchObject({ from: inv.id, to: inv2.id, batch: 3 });
    expect(Number(first.actor_id)).toBe(sup.id);

    await waitFor(async () => heardByNew.filter((e) => ids.includes(e.caseId)).length >= 3);
    const toOld = heardByOld.find((e) => e.caseId === ids[0]);
    expect(toOld).toMatchObject({ assigneeId: inv2.id, previousAssigneeId: inv.id });

    const mail = await findMail((m) => m.to.includes(inv2.email) && m.subject === '3 cases are now yours');
    for (const id of ids) expect(mail.text).toContain(`#${id}`);
    expect(mail.text).toContain('Covering for the afternoon');
    expect(mail.text).not.toMatch(/\d{12,}/);
  });

  it('is all or nothing: one closed case in the list and none moves', async () => {
    const open = await newCase(ts, key);
    const closed = await newCase(ts, key);
    await send(inv, 'post', `/api/cases/${closed}/claim`).expect(200);
    await send(inv, 'post', `/api/cases/${closed}/disposition`, { disposition: 'inconclusive', reason: 'Not enough to go on', version: await version(closed) }).expect(200);
    const res = await send(sup, 'post', '/api/cases/reassign', { caseIds: [open, closed, 99_999_999], assigneeId: inv2.id });
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('reassign_refused');
    expect(res.body.error.refused).toEqual([
      { id: closed, reason: 'closed' },
      { id: 99_999_999, reason: 'no such case' },
    ]);
    expect((await caseRow(open)).assignee_id).toBeNull();
    const [{ n }] = await q<{ n: number }>("SELECT COUNT(*) AS n FROM audit_log WHERE action = 'case.reassign' AND target_id = ?", [String(open)]);
    expect(Number(n)).toBe(0);
    // Only active investigators and supervisors can be handed cases; investigators cannot hand them out.
    const admin = await signIn(ts, 'admin@demo.test');
    expect((await send(sup, 'post', '/api/cases/reassign', { caseIds: [open], assigneeId: admin.id })).status).toBe(400);
    expect((await send(inv, 'post', '/api/cases/reassign', { caseIds: [open], assigneeId: inv.id })).status).toBe(403);
  });
});

describe('routing rules', () => {
  it('assigns new cases within the first matching rule’s group, round-robin then least-loaded, and previews yesterday', async () => {
    const group = await send(sup, 'post', '/api/routing/groups', { name: 'High value desk', strategy: 'round_robin', memberIds: [inv.id, inv2.id] });
    expect(group.status).toBe(201);
    const groupId = group.body.groups.find((g: { name: string }) => g.name === 'High value desk').id as number;
    const other = await send(sup, 'post', '/api/routing/groups', { name: 'Foreign desk', strategy: 'least_loaded', memberIds: [sup2.id] });
    const otherId = other.body.groups.find((g: { name: string }) => g.name === 'Foreign desk').id as number;
    const rules = await send(sup, 'put', '/api/routing/rules', {
      rules: [
        { name: 'Abroad', countries: ['FR'], groupId: otherId },
        { name: 'Above 2,500', minAmount: 2500, groupId },
      ],
    });
    expect(rules.status).toBe(200);
    expect(rules.body.rules.map((r: { name: string; position: number }) => [r.position, r.name])).toEqual([
      [1, 'Abroad'],
      [2, 'Above 2,500'],
    ]);

    const routed = [await newCase(ts, key, '2900.00'), await newCase(ts, key, '2950.00'), await newCase(ts, key, '2990.00')];
    const holders = await Promise.all(routed.map(async (id) => Number((await caseRow(id)).assignee_id)));
    // Round-robin in user-id order, starting with the lowest id.
    const [lo, hi] = [inv.id, inv2.id].sort((a, b) => a - b);
    expect(holders).toEqual([lo, hi, lo]);
    for (const id of routed) {
      const c = await caseRow(id);
      expect(c.status).toBe('new');
      expect(c.claimed_at).not.toBeNull();
    }
    // Below the limit: no rule matches, the case stays in the shared queue.
    const unrouted = await newCase(ts, key, '2100.00');
    expect((await caseRow(unrouted)).assignee_id).toBeNull();

    // Least-loaded: whoever holds fewer open cases gets the next one.
    await send(sup, 'put', `/api/routing/groups/${groupId}`, { name: 'High value desk', strategy: 'least_loaded', memberIds: [inv.id, inv2.id] }).expect(200);
    const load = async (id: number) => Number((await q<{ n: number }>('SELECT COUNT(*) AS n FROM cases WHERE is_open = 1 AND assignee_id = ?', [id]))[0].n);
    const [l1, l2] = [await load(inv.id), await load(inv2.id)];
    const expected = l1 < l2 || (l1 === l2 && inv.id < inv2.id) ? inv.id : inv2.id;
    const next = await newCase(ts, key, '2900.00');
    expect(Number((await caseRow(next)).assignee_id)).toBe(expected);

    // The assignee can claim a case routed to them.
    const mine = routed[0];
    const claimer = holders[0] === inv.id ? inv : inv2;
    const claim = await send(claimer, 'post', `/api/cases/${mine}/claim`);
    expect(claim.status).toBe(200);
    expect(claim.body.case.status).toBe('claimed');

    // Preview: move three of these cases to yesterday (UTC) and count what each rule would have taken.
    const now = new Date();
    const yesterdayNoon = new Date(Date.UTC(now.getUTCFullYear(), now.getUTCMonth(), now.getUTCDate() - 1, 12));
    await ts.server.db.sequelize.query('UPDATE cases SET created_at = ? WHERE id IN (?)', { replacements: [yesterdayNoon, [routed[1], routed[2], unrouted]], type: QueryTypes.UPDATE });
    const saved = await send(sup, 'post', '/api/routing/preview', {});
    expect(saved.status).toBe(200);
    expect(saved.body.day).toBe(yesterdayNoon.toISOString().slice(0, 10));
    expect(saved.body.total).toBe(3);
    expect(saved.body.perRule).toEqual([
      { position: 1, name: 'Abroad', count: 0 },
      { position: 2, name: 'Above 2,500', count: 2 },
    ]);
    expect(saved.body.unmatched).toBe(1);
    const draft = await send(sup, 'post', '/api/routing/preview', { rules: [{ name: 'Above 2,960', minAmount: 2960, groupId }, { name: 'US', countries: ['US'], groupId }] });
    expect(draft.body.perRule).toEqual([
      { position: 1, name: 'Above 2,960', count: 1 },
      { position: 2, name: 'US', count: 2 },
    ]);
    expect(draft.body.unmatched).toBe(0);

    // A group a rule uses cannot go; without rules it can.
    expect((await send(sup, 'delete', `/api/routing/groups/${groupId}`)).status).toBe(409);
    await send(sup, 'put', '/api/routing/rules', { rules: [] }).expect(200);
    expect((await send(sup, 'delete', `/api/routing/groups/${groupId}`)).status).toBe(200);
    const afterDelete = await newCase(ts, key, '2900.00');
    expect((await caseRow(afterDelete)).assignee_id).toBeNull();
  });

  it('refuses rules without conditions or naming no group', async () => {
    const res = await send(sup, 'put', '/api/routing/rules', { rules: [{ name: 'Everything', groupId: 1 }] });
    expect(res.status).toBe(400);
    const bad = await send(sup, 'put', '/api/routing/rules', { rules: [{ name: 'Ghost', minAmount: 1, groupId: 987_654 }] });
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields[0].path).toBe('rules.0.groupId');
  });
});

describe('four-eyes approval', () => {
  it('holds an above-limit decision without labels until another supervisor approves; refuses self-approval', async () => {
    await send(sup, 'put', '/api/settings/approval-limit', { approvalLimit: 2500 }).expect(200);

    // Below the limit: closes at once, as before.
    const small = await newCase(ts, key, '2100.00');
    await send(inv, 'post', `/api/cases/${small}/claim`).expect(200);
    const direct = await send(inv, 'post', `/api/cases/${small}/disposition`, { disposition: 'legitimate', reason: 'Cardholder confirmed it', version: await version(small) });
    expect(direct.status).toBe(200);
    expect(direct.body.case.status).toBe('closed');
    expect(direct.body.approval).toBeNull();
    expect(await labelsOf(small)).toHaveLength(1);

    // Above it: proposed, waiting, no labels.
    const big = await newCase(ts, key, '2900.00');
    await send(inv, 'post', `/api/cases/${big}/claim`).expect(200);
    const proposal = await send(inv, 'post', `/api/cases/${big}/disposition`, {
      disposition: 'confirmed_fraud',
      fraudType: 'card_not_present',
      reason: 'Cardholder denies it',
      amountConfirmed: '2900.00',
      version: await version(big),
    });
    expect(proposal.status).toBe(200);
    expect(proposal.body.case.status).toBe('awaiting_approval');
    expect(proposal.body.approval).toMatchObject({ status: 'pending', limit: 2500 });
    expect(await labelsOf(big)).toHaveLength(0);
    const again = await send(inv, 'post', `/api/cases/${big}/disposition`, { disposition: 'legitimate', reason: 'Changed my mind', version: await version(big) });
    expect(again.status).toBe(409);
    expect(again.body.error.code).toBe('awaiting_approval');
    expect((await inv.agent.get('/api/approvals')).status).toBe(403);
    const list = await sup.agent.get('/api/approvals').expect(200);
    const item = list.body.items.find((a: { caseId: number }) => a.caseId === big);
    expect(item).toMatchObject({ disposition: 'confirmed_fraud', fraudType: 'card_not_present', proposedBy: { id: inv.id }, status: 'pending' });
    expect(item.amountConfirmed).toEqual({ minor: 290_000, currency: 'USD', exponent: 2 });

    // Returned with a note: back with the investigator, claimed, note on the case.
    const rejected = await send(sup, 'post', `/api/approvals/${item.id}/reject`, { note: 'Attach the cardholder statement first' });
    expect(rejected.status).toBe(200);
    expect(rejected.body.case.status).toBe('claimed');
    expect(rejected.body.case.assignee.id).toBe(inv.id);
    expect(await labelsOf(big)).toHaveLength(0);
    const file = await inv.agent.get(`/api/cases/${big}`).expect(200);
    expect(file.body.notes.map((n: { text: string }) => n.text)).toContain('Returned without approval: Attach the cardholder statement first');
    expect((await send(sup, 'post', `/api/approvals/${item.id}/approve`)).status).toBe(409);

    // Proposed again, approved by a supervisor: closed, labels count, credited to the proposer.
    const second = await send(inv, 'post', `/api/cases/${big}/disposition`, {
      disposition: 'confirmed_fraud',
      fraudType: 'card_not_present',
      reason: 'Statement attached, cardholder denies it',
      version: await version(big),
    });
    const approvalId = second.body.approval.id as number;
    const approved = await send(sup, 'post', `/api/approvals/${approvalId}/approve`, {});
    expect(approved.status).toBe(200);
    expect(approved.body.case.status).toBe('closed');
    const labels = await labelsOf(big);
    expect(labels).toEqual([{ label: 'fraud', created_by: inv.id }]);
    const [closedRow] = await q<{ closed_by: number; disposition: string }>('SELECT closed_by, disposition FROM cases WHERE id = ?', [big]);
    expect(Number(closedRow.closed_by)).toBe(sup.id);
    expect(closedRow.disposition).toBe('confirmed_fraud');
    const trail = await q<{ action: string; actor_id: string }>("SELECT action, actor_id FROM audit_log WHERE target_type = 'case' AND target_id = ? ORDER BY id", [String(big)]);
    expect(trail.map((t) => t.action)).toEqual(
      expect.arrayContaining(['case.disposition_proposed', 'case.approval_rejected', 'case.approval_approved', 'case.disposition']),
    );
    expect(Number(trail.find((t) => t.action === 'case.disposition')!.actor_id)).toBe(sup.id);

    // A supervisor's own proposal needs another supervisor.
    const own = await newCase(ts, key, '2900.00');
    await send(sup, 'post', `/api/cases/${own}/claim`).expect(200);
    const mine = await send(sup, 'post', `/api/cases/${own}/disposition`, { disposition: 'legitimate', reason: 'Known travel pattern', version: await version(own) });
    expect(mine.body.case.status).toBe('awaiting_approval');
    const self = await send(sup, 'post', `/api/approvals/${mine.body.approval.id}/approve`, {});
    expect(self.status).toBe(403);
    expect(self.body.error.code).toBe('own_proposal');
    expect((await caseRow(own)).status).toBe('awaiting_approval');
    const [denied] = await q<{ outcome: string }>("SELECT outcome FROM audit_log WHERE action = 'case.approval_approved' AND target_id = ? ORDER BY id DESC LIMIT 1", [String(own)]);
    expect(denied.outcome).toBe('denied');
    const byOther = await send(sup2, 'post', `/api/approvals/${mine.body.approval.id}/approve`, {});
    expect(byOther.status).toBe(200);
    expect(await labelsOf(own)).toEqual([{ label: 'legitimate', created_by: sup.id }]);
  });
});

describe('SLA policy', () => {
  it('sets the minutes per band for cases opened from now on, and refuses bands out of order', async () => {
    const bad = await send(sup, 'put', '/api/settings/sla', { slaMinutes: { urgent: 30, high: 60, standard: 120 }, priorityBands: { urgent: 0.7, high: 0.8 } });
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields[0].path).toBe('priorityBands.high');
    const policy = { slaMinutes: { urgent: 7, high: 11, standard: 13 }, priorityBands: { urgent: 0.95, high: 0.6 } };
    const ok = await send(sup, 'put', '/api/settings/sla', policy);
    expect(ok.status).toBe(200);
    expect(ok.body.sla).toEqual(policy);
    const id = await newCase(ts, key, '2900.00');
    const c = await caseRow(id);
    const minutes = (new Date(c.sla_due_at).getTime() - new Date(c.created_at).getTime()) / 60_000;
    expect(minutes).toBeCloseTo(policy.slaMinutes[c.priority as 'urgent' | 'high' | 'standard'], 0);
    await send(sup, 'put', '/api/settings/sla', defaults.sla).expect(200);
  });
});

describe('team board', () => {
  it('counts open, claimed, closed today, median handling and breaches per person, and the queue age and hourly volume', async () => {
    const inv3 = await newPerson(ts, 'investigator', 'Board Investigator');
    const ids = [await newCase(ts, key, '2100.00'), await newCase(ts, key, '2150.00'), await newCase(ts, key, '2200.00')];
    await send(sup, 'post', '/api/cases/reassign', { caseIds: ids, assigneeId: inv3.id }).expect(200);
    await send(inv3, 'post', `/api/cases/${ids[2]}/claim`).expect(200);
    for (const id of ids.slice(0, 2)) {
      await send(inv3, 'post', `/api/cases/${id}/disposition`, { disposition: 'legitimate', reason: 'Cardholder confirmed it', version: await version(id) }).expect(200);
    }
    // Handling times of 10 and 30 minutes: the median is 20.
    await ts.server.db.sequelize.query('UPDATE cases SET claimed_at = DATE_SUB(closed_at, INTERVAL 10 MINUTE) WHERE id = ?', { replacements: [ids[0]], type: QueryTypes.UPDATE });
    await ts.server.db.sequelize.query('UPDATE cases SET claimed_at = DATE_SUB(closed_at, INTERVAL 30 MINUTE) WHERE id = ?', { replacements: [ids[1]], type: QueryTypes.UPDATE });
    // The open one is past its deadline and opened three hours ago.
    await ts.server.db.sequelize.query('UPDATE cases SET sla_due_at = DATE_SUB(UTC_TIMESTAMP(3), INTERVAL 5 MINUTE), created_at = DATE_SUB(UTC_TIMESTAMP(3), INTERVAL 3 HOUR) WHERE id = ?', {
      replacements: [ids[2]],
      type: QueryTypes.UPDATE,
    });

    const res = await sup.agent.get('/api/board').expect(200);
    const b = res.body;
    const me = b.people.find((p: { id: number }) => p.id === inv3.id);
    expect(me).toEqual({
      id: inv3.id,
      displayName: 'Board Investigator',
      role: 'investigator',
      status: 'active',
      open: 1,
      claimed: 1,
      closedToday: 2,
      medianHandlingMinutes: 20,
      slaBreaches: 1,
    });
    const [{ open, breached }] = await q<{ open: number; breached: number }>('SELECT COUNT(*) AS open, COALESCE(SUM(sla_due_at < UTC_TIMESTAMP(3)), 0) AS breached FROM cases WHERE is_open = 1');
    expect(b.totals.open).toBe(Number(open));
    expect(b.queueAge.reduce((s: number, x: { count: number }) => s + x.count, 0)).toBe(Number(open));
    expect(b.queueAge.reduce((s: number, x: { breached: number }) => s + x.breached, 0)).toBe(Number(breached));
    expect(b.queueAge.find((x: { label: string }) => x.label === '2–4 h').count).toBeGreaterThanOrEqual(1);
    expect(b.alertVolume).toHaveLength(24);
    const since = b.alertVolume[0].hour;
    const [{ n: alerts }] = await q<{ n: number }>('SELECT COUNT(*) AS n FROM alerts WHERE created_at >= ?', [new Date(since)]);
    expect(b.alertVolume.reduce((s: number, h: { alerts: number }) => s + h.alerts, 0)).toBe(Number(alerts));
    expect((await inv.agent.get('/api/board')).status).toBe(403);
  });
});

describe('threshold curve', () => {
  it('falls back to labelled scored transactions when the champion has no score histogram, and says so', async () => {
    const res = await sup.agent.get('/api/settings/threshold-curve?days=7').expect(200);
    const c = res.body;
    expect(c.points).toHaveLength(99);
    expect(c.precisionSource).toBe('labelled_scores');
    expect(c.precisionNote).toMatch(/no score histogram/);
    const t = 0.5;
    const p = c.points.find((x: { threshold: number }) => x.threshold === t);
    // The same figures straight from the rows (latest label per transaction, champion's scores).
    const [champ] = await q<{ id: number }>("SELECT id FROM model_versions WHERE role = 'champion' ORDER BY id DESC LIMIT 1");
    const rows = await q<{ probability: number; label: string }>(
      `SELECT s.probability, l.label FROM transaction_scores s JOIN labels l ON l.id = (SELECT MAX(id) FROM labels WHERE transaction_id = s.transaction_id)
       WHERE s.model_version_id = ?`,
      [champ.id],
    );
    const tp = rows.filter((r) => r.label === 'fraud' && r.probability >= t).length;
    const fp = rows.filter((r) => r.label === 'legitimate' && r.probability >= t).length;
    const fraud = rows.filter((r) => r.label === 'fraud').length;
    expect(fraud).toBeGreaterThan(0);
    expect(p.precision).toBeCloseTo(tp / (tp + fp), 12);
    expect(p.recall).toBeCloseTo(tp / fraud, 12);
    // Alerts per day: transactions scored at or above t over the span the window covers.
    const [{ n }] = await q<{ n: number }>('SELECT COUNT(*) AS n FROM transaction_scores WHERE scored_at >= ? AND probability >= ?', [new Date(c.traffic.from), t]);
    expect(p.alertsPerDay * c.traffic.days).toBeCloseTo(Number(n), 6);
    expect(p.casesPerDay).toBeLessThanOrEqual(p.alertsPerDay);
    // Monotone: a higher threshold never expects more alerts.
    for (let i = 1; i < c.points.length; i += 1) expect(c.points[i].alertsPerDay).toBeLessThanOrEqual(c.points[i - 1].alertsPerDay);
  });

  it('uses the champion’s held-out probability histogram when it is stored', async () => {
    // 20 bins of width 0.05 on [0, 1]; fraud sits high, legitimate low.
    const fraud = [0, 0, 0, 0, 0, 0, 0, 0, 1, 1, 2, 2, 3, 3, 4, 4, 5, 5, 6, 9];
    const legitimate = [900, 500, 300, 200, 100, 60, 40, 30, 20, 15, 10, 8, 6, 4, 3, 2, 1, 1, 0, 0];
    const edges = Array.from({ length: 21 }, (_, k) => k / 20);
    await ts.server.db.sequelize.query("UPDATE model_versions SET role = 'retired' WHERE role = 'champion'", { type: QueryTypes.UPDATE });
    await insertModelVersion(ts.server.db, {
      label: `with-metrics-${Date.now()}`,
      role: 'champion',
      model: fixtureModel(),
      metrics: { evaluation: { n: 2245, fraud: 45, probabilityHistogram: { edges, fraud, legitimate } } },
    });
    const c = (await sup.agent.get('/api/settings/threshold-curve').expect(200)).body;
    expect(c.precisionSource).toBe('holdout_histogram');
    const at = (t: number) => c.points.find((x: { threshold: number }) => x.threshold === t);
    // At the edge 0.50 (bin 10 on): TP = 2+2+3+3+4+4+5+5+6+9 = 43, FP = 10+8+6+4+3+2+1+1 = 35; 45 fraud in all.
    expect(at(0.5).precision).toBeCloseTo(43 / 78, 12);
    expect(at(0.5).recall).toBeCloseTo(43 / 45, 12);
    // Inside bin 10 ([0.50, 0.55)): 0.52 keeps (0.55 - 0.52) / 0.05 = 60 % of it.
    const tp = 41 + 0.6 * 2;
    const fp = 25 + 0.6 * 10;
    expect(at(0.52).precision).toBeCloseTo(tp / (tp + fp), 12);
    expect(at(0.52).recall).toBeCloseTo(tp / 45, 12);
    // Near the top only part of the last bin ([0.95, 1.00]) counts: (1.00 - 0.99) / 0.05 = 20 % of its 9 fraud rows.
    expect(at(0.99).recall).toBeCloseTo(9 * 0.2 / 45, 12);
  });

  it('on stored history, counts alerts and cases a day from the champion’s scores of the stored features', async () => {
    // Two more on one card, so a card-day holds several transactions.
    await postScored(ts, key, '2900.00', 990_001);
    await postScored(ts, key, '12.00', 990_001);
    const to = new Date(Date.now() + 60_000);
    const from = new Date(to.getTime() - 3 * 86_400_000);
    const c = await buildHistoryThresholdCurve(ts.server.db, { from, to }, 0.5);
    // The same figures straight from the rows, scored here with the champion as stored.
    const [champ] = await q<{ model_json: string }>("SELECT model_json FROM model_versions WHERE role = 'champion' ORDER BY id DESC LIMIT 1");
    const scorer = compileModel(parseModel(JSON.parse(champ.model_json)));
    const rows = await q<{ card_id: number; occurred_at: Date; features: string }>(
      'SELECT t.card_id, t.occurred_at, f.features FROM transactions t JOIN transaction_features f ON f.transaction_id = t.id WHERE t.occurred_at >= ? AND t.occurred_at < ?',
      [from, to],
    );
    expect(rows.length).toBeGreaterThan(10);
    expect(c.traffic.scored).toBe(rows.length);
    expect(c.traffic.days).toBeCloseTo(3, 9);
    const p = rows.map((r) => scorer.probability(scorer.score(JSON.parse(r.features))));
    const dayMax = new Map<string, number>();
    rows.forEach((r, i) => {
      const k = `${r.card_id}/${new Date(r.occurred_at).toISOString().slice(0, 10)}`;
      dayMax.set(k, Math.max(dayMax.get(k) ?? 0, p[i]));
    });
    expect(dayMax.size).toBeLessThan(rows.length);
    let between = 0;
    for (const t of [0.01, 0.2, 0.5, 0.9]) {
      const point = c.points.find((x: { threshold: number }) => x.threshold === t)!;
      const alerts = p.filter((x) => x >= t).length;
      if (alerts > 0 && alerts < rows.length) between += 1;
      expect(point.alertsPerDay * c.traffic.days).toBeCloseTo(alerts, 9);
      expect(point.casesPerDay * c.traffic.days).toBeCloseTo([...dayMax.values()].filter((x) => x >= t).length, 9);
    }
    // At least one threshold splits the rows, so the counts above are not all or nothing.
    expect(between).toBeGreaterThan(0);
    expect(c.precisionSource).toBe('holdout_histogram');
  });
});
