/**
 * Late labels: a CSV of chargebacks (transactionId, reportedAt, fraudType)
 * checked row by row, with a downloadable error report whose cells cannot run
 * as spreadsheet formulas (OWASP, "CSV Injection": a cell starting with =, +,
 * -, @, tab or CR gets a leading apostrophe) and never carry a card number;
 * and the label coverage and delay the Models screen shows. Data: invented
 * fixture history.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { parse } from 'csv-parse/sync';
import { QueryTypes } from 'sequelize';
import { signedInAgent, startTestServer, type Agent, type TestServer } from './helpers/test-server';
import { seedLabelledHistory } from './helpers/labelled-history';

let ts: TestServer;
let ds: { agent: Agent; csrf: string };
const DAY = 86_400_000;
const FROM = new Date(Date.now() - 60 * DAY);
const TO = new Date(Date.now() - 40 * DAY);
/** Fixture transactions without any label yet, with when they happened. */
let free: { externalId: string; occurredAt: Date }[] = [];

const upload = (csv: string, name = 'chargebacks.csv') =>
  ds.agent.post('/api/labels/imports').set('X-CSRF-Token', ds.csrf).attach('file', Buffer.from(csv, 'utf8'), { filename: name, contentType: 'text/csv' });
const ymd = (d: Date) => d.toISOString().slice(0, 10);

beforeAll(async () => {
  ts = await startTestServer();
  const prefix = `late-${Date.now().toString(36)}`;
  await seedLabelledHistory(ts.server.db, { from: FROM, to: TO, rows: 60, seed: 77, prefix });
  const rows = await ts.server.db.sequelize.query<{ external_id: string; occurred_at: Date }>(
    `SELECT t.external_id, t.occurred_at FROM transactions t WHERE t.external_id LIKE ? AND NOT EXISTS (SELECT 1 FROM labels l WHERE l.transaction_id = t.id)
     ORDER BY t.id LIMIT 8`,
    { replacements: [`${prefix}-%`], type: QueryTypes.SELECT },
  );
  free = rows.map((r) => ({ externalId: r.external_id, occurredAt: new Date(r.occurred_at) }));
  expect(free.length).toBe(8);
  ds = await signedInAgent(ts, 'data_scientist');
}, 60_000);

afterAll(async () => {
  await ts?.close();
});

describe('late-label CSV import', () => {
  it('adds the good rows, counts repeats as duplicates and reports each bad row', async () => {
    const [a, b, c, d, e] = free;
    const tenDaysAfter = (x: { occurredAt: Date }) => new Date(x.occurredAt.getTime() + 10 * DAY);
    const coverageBefore = await ds.agent.get('/api/labels/coverage?weeks=12').expect(200);
    const delayBefore = await ds.agent.get('/api/labels/delay?days=180').expect(200);
    const csv = [
      'transactionId,reportedAt,fraudType',
      `${a.externalId},${ymd(tenDaysAfter(a))},card_not_present`,
      `${b.externalId},${tenDaysAfter(b).toISOString()},counterfeit`,
      `${a.externalId},${ymd(tenDaysAfter(a))},counterfeit`,
      `-A1,${ymd(tenDaysAfter(a))},counterfeit`,
      `${c.externalId},2026-13-01,counterfeit`,
      `${c.externalId},${ymd(tenDaysAfter(c))},=SUM(1+1)`,
      `"=HYPERLINK(""http://example.invalid"")",${ymd(tenDaysAfter(c))},counterfeit`,
      `4111111111111111,${ymd(tenDaysAfter(c))},counterfeit`,
      `${d.externalId},${ymd(new Date(d.occurredAt.getTime() - 5 * DAY))},counterfeit`,
      `${e.externalId},2099-01-01,counterfeit`,
      `${e.externalId},${ymd(tenDaysAfter(e))}`,
    ].join('\n');
    const res = await upload(csv);
    expect(res.status).toBe(200);
    expect(res.body.import).toMatchObject({ status: 'completed', counts: { rowsRead: 11, added: 2, duplicate: 1, rejected: 8 } });

    const labels = await ts.server.db.sequelize.query<{ external_id: string; label: string; fraud_type: string; source: string; reported_at: Date }>(
      `SELECT t.external_id, l.label, l.fraud_type, l.source, l.reported_at FROM labels l JOIN transactions t ON t.id = l.transaction_id
       WHERE t.external_id IN (?) ORDER BY t.external_id`,
      { replacements: [free.map((f) => f.externalId)], type: QueryTypes.SELECT },
    );
    expect(labels.map((l) => [l.external_id, l.label, l.fraud_type, l.source]).sort()).toEqual(
      [
        [a.externalId, 'fraud', 'card_not_present', 'chargeback'],
        [b.externalId, 'fraud', 'counterfeit', 'chargeback'],
      ].sort(),
    );
    expect(new Date(labels.find((l) => l.external_id === b.externalId)!.reported_at).toISOString()).toBe(tenDaysAfter(b).toISOString());

    // The error report: line, id (only a well-formed id), field, message.
    const report = await ds.agent.get(res.body.import.errorReportUrl).buffer(true).parse((r, cb) => {
      let body = '';
      r.setEncoding('utf8');
      r.on('data', (chunk: string) => (body += chunk));
      r.on('end', () => cb(null, body));
    });
    expect(report.status).toBe(200);
    expect(report.headers['content-type']).toMatch(/^text\/csv/);
    const text = report.body as string;
    expect(text.charCodeAt(0)).toBe(0xfeff);
    expect(text).not.toMatch(/\d{12,}/);
    const rows = parse(text, { bom: true, columns: true }) as { row: string; id: string; field: string; message: string }[];
    const byLine = Object.fromEntries(rows.map((r) => [r.row, r]));
    expect(Object.keys(byLine).sort()).toEqual(['10', '11', '12', '5', '6', '7', '8', '9'].sort());
    expect(byLine['5']).toMatchObject({ id: "'-A1", field: 'transactionId' });
    expect(byLine['6']).toMatchObject({ id: c.externalId, field: 'reportedAt' });
    expect(byLine['7']).toMatchObject({ field: 'fraudType' });
    expect(byLine['8']).toMatchObject({ id: '', field: 'transactionId' });
    expect(byLine['9'].message).toMatch(/no stored transaction/);
    expect(byLine['10'].message).toMatch(/before the transaction/);
    expect(byLine['11'].message).toMatch(/future/);
    expect(byLine['12']).toMatchObject({ field: '(row)' });
    // No cell a spreadsheet would run: every cell starting with a formula character is neutralised.
    for (const r of rows) for (const cell of Object.values(r)) expect(cell).not.toMatch(/^[=+\-@\t\r]/);

    // Coverage and delay follow: two more fraud labels, both chargebacks ten days after the transaction.
    const coverageAfter = await ds.agent.get('/api/labels/coverage?weeks=12').expect(200);
    const sum = (weeks: { fraud: number; labelled: number }[], k: 'fraud' | 'labelled') => weeks.reduce((s, w) => s + w[k], 0);
    expect(sum(coverageAfter.body.weeks, 'fraud') - sum(coverageBefore.body.weeks, 'fraud')).toBe(2);
    expect(sum(coverageAfter.body.weeks, 'labelled') - sum(coverageBefore.body.weeks, 'labelled')).toBe(2);
    for (const w of coverageAfter.body.weeks) expect(w.share).toBeCloseTo(w.labelled / w.transactions, 12);
    const delayAfter = await ds.agent.get('/api/labels/delay?days=180').expect(200);
    // a was reported on a date (midnight UTC): 9 or 10 whole days after it happened; b exactly 10 days after.
    const daysA = Math.floor((Date.parse(ymd(tenDaysAfter(a))) - a.occurredAt.getTime()) / DAY);
    type Bin = { fromDays: number; toDays: number; chargeback: number };
    const binOf = (bins: Bin[], days: number) => bins.findIndex((bin) => days >= bin.fromDays && (bin.toDays === -1 || days < bin.toDays));
    const added = (delayAfter.body.bins as Bin[]).map((bin, i) => bin.chargeback - (delayBefore.body.bins as Bin[])[i].chargeback);
    const expected = added.map(() => 0);
    expected[binOf(delayAfter.body.bins, daysA)] += 1;
    expected[binOf(delayAfter.body.bins, 10)] += 1;
    expect(added).toEqual(expected);
    expect(delayAfter.body.count - delayBefore.body.count).toBe(2);
  });

  it('the same chargebacks again are duplicates, not new labels', async () => {
    const [a, b] = free;
    const csv = `transactionId,reportedAt,fraudType\n${a.externalId},${ymd(new Date(a.occurredAt.getTime() + 10 * DAY))},card_not_present\n${b.externalId},${ymd(new Date(b.occurredAt.getTime() + 11 * DAY))},counterfeit\n`;
    const res = await upload(csv);
    expect(res.body.import.counts).toEqual({ rowsRead: 2, added: 0, duplicate: 2, rejected: 0 });
    expect(res.body.import.errorReportUrl).toBeNull();
  });

  it('refuses a file whose header is not the late-label columns, and one that is not CSV', async () => {
    const bad = await upload('id,when,type\nx,2026-01-01,counterfeit\n');
    expect(bad.status).toBe(400);
    expect(bad.body.error.code).toBe('invalid_header');
    const notCsv = await ds.agent.post('/api/labels/imports').set('X-CSRF-Token', ds.csrf).attach('file', Buffer.from([0x89, 0x50, 0x4e, 0x47, 0, 0, 0]), { filename: 'x.png', contentType: 'image/png' });
    expect(notCsv.status).toBe(415);
  });

  it('keeps each person’s reports to themselves (an admin sees all)', async () => {
    const list = await ds.agent.get('/api/labels/imports').expect(200);
    const withReport = list.body.imports.find((i: { errorReportUrl: string | null }) => i.errorReportUrl);
    const other = await signedInAgent(ts, 'admin');
    expect((await other.agent.get(withReport.errorReportUrl)).status).toBe(200);
    expect((await ds.agent.get('/api/labels/imports/999999/errors.csv')).status).toBe(404);
  });
});
