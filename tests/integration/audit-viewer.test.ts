import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { parse } from 'csv-parse/sync';
import type request from 'supertest';
import { QueryTypes } from 'sequelize';
import { appendAudit, verifyAuditChain } from '../../server/src/audit/audit-repository';
import { startTestServer, type TestServer } from './helpers/test-server';
import { send, signIn, type Person } from './helpers/supervision-kit';

let ts: TestServer;
let sup: Person;
let admin: Person;

/** The update trigger exactly as migration 0001 creates it. */
const NO_UPDATE_TRIGGER =
  "CREATE TRIGGER audit_log_no_update BEFORE UPDATE ON audit_log FOR EACH ROW SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'audit_log is append-only'";

beforeAll(async () => {
  ts = await startTestServer();
  sup = await signIn(ts, 'supervisor@demo.test');
  admin = await signIn(ts, 'admin@demo.test');
});

afterAll(async () => {
  await ts?.close();
});

describe('audit log viewer', () => {
  it('filters by person, action family, record and time, newest first, paginated', async () => {
    const marker = `probe-${Date.now()}`;
    for (let i = 0; i < 3; i += 1) {
      await appendAudit(ts.server.db, { actorType: 'user', actorId: sup.id, actorLabel: sup.email, action: 'case.note', targetType: 'case', targetId: marker, outcome: 'success', details: { i } });
    }
    await appendAudit(ts.server.db, { actorType: 'user', actorId: admin.id, actorLabel: admin.email, action: 'user.unlock', targetType: 'case', targetId: marker, outcome: 'success' });

    const byRecord = await sup.agent.get(`/api/audit?targetType=case&targetId=${marker}`).expect(200);
    expect(byRecord.body.total).toBe(4);
    const ids = byRecord.body.items.map((r: { id: number }) => r.id);
    expect([...ids].sort((a, b) => b - a)).toEqual(ids);
    const byPerson = await sup.agent.get(`/api/audit?targetId=${marker}&actorId=${sup.id}&action=case.`).expect(200);
    expect(byPerson.body.total).toBe(3);
    expect(byPerson.body.items.every((r: { action: string; actorId: string }) => r.action === 'case.note' && r.actorId === String(sup.id))).toBe(true);
    expect(byPerson.body.items[0].details).toEqual({ i: 2 });
    const page2 = await sup.agent.get(`/api/audit?targetId=${marker}&pageSize=3&page=2`).expect(200);
    expect(page2.body.items).toHaveLength(1);
    expect(page2.body.items[0].id).toBe(Math.min(...ids));
    const future = new Date(Date.now() + 3_600_000).toISOString();
    expect((await sup.agent.get(`/api/audit?targetId=${marker}&from=${encodeURIComponent(future)}`).expect(200)).body.total).toBe(0);
    expect((await sup.agent.get('/api/audit?from=yesterday')).status).toBe(400);
    // "_" is a LIKE wildcard: an action family must match literally.
    expect((await sup.agent.get(`/api/audit?targetId=${marker}&action=case_`).expect(200)).body.total).toBe(0);
    const facets = await admin.agent.get('/api/audit/facets').expect(200);
    expect(facets.body.actions).toEqual(expect.arrayContaining(['case.note', 'user.unlock']));
    const inv = await signIn(ts, 'investigator@demo.test');
    expect((await inv.agent.get('/api/audit')).status).toBe(403);
  });

  it('exports CSV with formula cells neutralised (OWASP CSV Injection: = + - @ tab CR)', async () => {
    const marker = `csv-${Date.now()}`;
    const hostile = ['=HYPERLINK("http://attacker.example","x")', '+1+2', '-2+3', '@SUM(1,2)', '\tTAB', '\rCR', 'plain, "quoted" text'];
    for (const label of hostile) {
      await appendAudit(ts.server.db, { actorType: 'anonymous', actorLabel: label, action: 'auth.sign_in', targetType: 'user', targetId: marker, outcome: 'failure' });
    }
    const text = (r: request.Response, cb: (err: Error | null, body: string) => void) => {
      let body = '';
      (r as unknown as NodeJS.ReadableStream).on('data', (c: Buffer) => (body += c.toString('utf8')));
      (r as unknown as NodeJS.ReadableStream).on('end', () => cb(null, body));
    };
    // The User-Agent header is the caller's to choose, and the export records it in its own audit row.
    const hostileAgent = "=cmd|' /C calc'!A0";
    const res = await sup.agent.get(`/api/audit/export.csv?targetId=${marker}`).set('User-Agent', hostileAgent).buffer(true).parse(text);
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toMatch(/^text\/csv/);
    expect(res.headers['content-disposition']).toMatch(/attachment; filename="?edgecase-audit-\d{4}-\d{2}-\d{2}\.csv"?$/);
    const rows = parse(res.body as string, { columns: true }) as Record<string, string>[];
    expect(rows.map((r) => r.actor_label)).toEqual([
      '\'=HYPERLINK("http://attacker.example","x")',
      "'+1+2",
      "'-2+3",
      "'@SUM(1,2)",
      "'\tTAB",
      "'\rCR",
      'plain, "quoted" text',
    ]);
    // Every field is quoted (RFC 4180 2.6), so a comma or quote inside a cell never splits it.
    expect((res.body as string).split('\r\n')[0]).toBe('"id","occurred_at","actor_type","actor_id","actor_label","action","target_type","target_id","outcome","ip","user_agent","details","prev_hash","hash"');
    const exports = await sup.agent.get('/api/audit/export.csv?action=audit.export').buffer(true).parse(text);
    const exportRows = parse(exports.body as string, { columns: true }) as Record<string, string>[];
    expect(exportRows.map((r) => r.user_agent)).toContain(`'${hostileAgent}`);
    expect(exportRows.map((r) => r.user_agent)).not.toContain(hostileAgent);
  });

  it('verifies the chain, names an edited row, and the trigger comes back as it was', async () => {
    const db = ts.server.db;
    const ok = await send(admin, 'post', '/api/audit/verify');
    expect(ok.status).toBe(200);
    expect(ok.body.ok).toBe(true);
    expect(ok.body.checked).toBeGreaterThan(3);

    const victim = await appendAudit(db, { actorType: 'system', actorLabel: 'tamper probe', action: 'demo.seed', outcome: 'success', details: { amount: 10 } });
    await appendAudit(db, { actorType: 'system', actorLabel: 'after the probe', action: 'demo.seed', outcome: 'success' });
    const [before] = await db.sequelize.query<{ ACTION_STATEMENT: string; ACTION_TIMING: string; EVENT_MANIPULATION: string }>(
      "SELECT ACTION_STATEMENT, ACTION_TIMING, EVENT_MANIPULATION FROM information_schema.TRIGGERS WHERE TRIGGER_SCHEMA = DATABASE() AND TRIGGER_NAME = 'audit_log_no_update'",
      { type: QueryTypes.SELECT },
    );
    expect(before).toBeDefined();
    // The app user may drop the trigger (it has TRIGGER rights): an insider could, and the chain still tells.
    await db.sequelize.query('DROP TRIGGER audit_log_no_update', { type: QueryTypes.RAW });
    try {
      await db.sequelize.query('UPDATE audit_log SET details = ? WHERE id = ?', { replacements: ['{"amount":1}', victim.id], type: QueryTypes.UPDATE });
      const direct = await verifyAuditChain(db);
      expect(direct).toMatchObject({ ok: false, firstBadId: victim.id, reason: 'row content does not match its hash' });
      const viaApi = await send(sup, 'post', '/api/audit/verify');
      expect(viaApi.body).toMatchObject({ ok: false, firstBadId: victim.id });
      // Put the row back so the rest of the suite sees an intact chain.
      await db.sequelize.query('UPDATE audit_log SET details = ? WHERE id = ?', { replacements: [victim.details, victim.id], type: QueryTypes.UPDATE });
    } finally {
      await db.sequelize.query(NO_UPDATE_TRIGGER, { type: QueryTypes.RAW });
    }
    const [after] = await db.sequelize.query<typeof before>(
      "SELECT ACTION_STATEMENT, ACTION_TIMING, EVENT_MANIPULATION FROM information_schema.TRIGGERS WHERE TRIGGER_SCHEMA = DATABASE() AND TRIGGER_NAME = 'audit_log_no_update'",
      { type: QueryTypes.SELECT },
    );
    expect(after).toEqual(before);
    await expect(db.sequelize.query("UPDATE audit_log SET action = 'x' WHERE id = ?", { replacements: [victim.id], type: QueryTypes.UPDATE })).rejects.toThrow(/append-only/);
    expect((await verifyAuditChain(db)).ok).toBe(true);
  });
});
