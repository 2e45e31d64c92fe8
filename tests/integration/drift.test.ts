/**
 * The daily drift report, through its queue and worker: PSI of the
 * champion's live score and features against the training baseline stored
 * with the champion, a report row for the chart, a flag above 0.25 (rule of
 * thumb, common practice) and an e-mail to the data scientists through the
 * mail queue. Data: invented fixture rows; the live day has its amounts
 * shifted upwards.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Queue } from 'bullmq';
import { QueryTypes } from 'sequelize';
import { FEATURES } from '../../shared/src/features/definitions';
import { QUEUES, type MailJob } from '../../shared/src/jobs/queues';
import { compileModel, type Row } from '../../shared/src/model/index';
import { toColumns } from '../../server/src/training/build-dataset';
import { buildDriftBaseline, psiNumeric } from '../../server/src/drift/baseline';
import { insertModelVersion } from '../../server/src/model-registry/model-repository';
import { createRedis } from '../../server/src/lib/redis';
import { createDriftWorker } from '../../workers/src/drift.worker';
import { signedInAgent, startTestServer, type TestServer } from './helpers/test-server';
import { fixtureModel } from './helpers/champion';

let ts: TestServer;
let worker: Awaited<ReturnType<typeof createDriftWorker>>;
let championId: number;
let liveAmounts: Float64Array;
let baseline: ReturnType<typeof buildDriftBaseline>;

function rows(n: number, seed: number, amountScale: number): Row[] {
  let s = seed;
  const rand = () => (s = (s * 16807) % 2147483647) / 2147483647;
  return Array.from({ length: n }, () => {
    const r: Row = Object.fromEntries(FEATURES.map((f) => [f.name, f.kind === 'numeric' ? Math.floor(rand() * 4) : 'x']));
    r.amount = Math.round(rand() * 1000 * amountScale) / 100;
    r.channel = rand() < 0.5 ? 'pos' : 'ecommerce';
    return r;
  });
}

beforeAll(async () => {
  ts = await startTestServer();
  const db = ts.server.db;
  const model = fixtureModel();
  const compiled = compileModel(model);
  const training = rows(4000, 5, 1);
  const trainCols = toColumns(training);
  baseline = buildDriftBaseline(model, trainCols, Float64Array.from(compiled.scoreColumns(trainCols), (m) => compiled.probability(m)));
  await db.sequelize.query("UPDATE model_versions SET role = 'retired' WHERE role IN ('champion', 'challenger')", { type: QueryTypes.UPDATE });
  championId = await insertModelVersion(db, { label: `drift-${Date.now().toString(36)}`, role: 'champion', model, metrics: { baseline } });

  // A day of live traffic: same shape, amounts three times larger.
  const live = rows(1500, 9, 3);
  liveAmounts = Float64Array.from(live, (r) => Number(r.amount));
  const base = 900_000_000_000 + Math.floor(Math.random() * 1_000_000) * 10_000;
  const scoredAt = new Date(Date.now() - 3_600_000);
  for (let i = 0; i < live.length; i += 500) {
    const part = live.slice(i, i + 500);
    await db.sequelize.query(`INSERT INTO transaction_features (transaction_id, features, computed_at) VALUES ${part.map(() => '(?, ?, ?)').join(', ')}`, {
      replacements: part.flatMap((r, k) => [base + i + k, JSON.stringify(r), scoredAt]),
      type: QueryTypes.INSERT,
    });
    await db.sequelize.query(
      `INSERT INTO transaction_scores (transaction_id, model_version_id, margin, normalized_margin, probability, reasons, alerted, threshold, scored_at)
       VALUES ${part.map(() => "(?, ?, ?, 0, ?, '[]', 0, 0.5, ?)").join(', ')}`,
      {
        replacements: part.flatMap((r, k) => {
          const m = compiled.score(r);
          return [base + i + k, championId, m, compiled.probability(m), scoredAt];
        }),
        type: QueryTypes.INSERT,
      },
    );
  }
  worker = await createDriftWorker(ts.server.config, db);
}, 60_000);

afterAll(async () => {
  await worker?.close();
  await ts?.close();
});

describe('drift report', () => {
  it('is computed on request by the drift worker, flags PSI above 0.25 and mails the data scientists', async () => {
    const ds = await signedInAgent(ts, 'data_scientist');
    const res = await ds.agent.post('/api/drift/reports').set('X-CSRF-Token', ds.csrf).send({});
    expect(res.status).toBe(202);
    let reports: { modelVersion: { id: number }; rows: number; flagged: string[]; features: { feature: string; psi: number; band: string }[]; score: { psi: number } }[] = [];
    for (let i = 0; i < 200 && reports.length === 0; i++) {
      await new Promise((r) => setTimeout(r, 50));
      reports = (await ds.agent.get(`/api/drift/reports?modelVersionId=${championId}`).expect(200)).body.reports;
    }
    expect(reports).toHaveLength(1);
    const [r] = reports;
    expect(r.rows).toBe(1500);
    const amount = r.features.find((f) => f.feature === 'amount')!;
    // The same number from the stored bins and the live amounts, recomputed here.
    const numeric = baseline.features.find((f) => f.feature === 'amount')!;
    if (numeric.kind !== 'numeric') throw new Error('amount is numeric');
    expect(amount.psi).toBeCloseTo(psiNumeric(numeric, liveAmounts).psi, 10);
    expect(amount.psi).toBeGreaterThan(0.25);
    expect(amount.band).toBe('act');
    expect(r.flagged).toContain('amount');
    // Features that did not move stay below the flag.
    expect(r.features.find((f) => f.feature === 'channel')!.psi).toBeLessThan(0.1);
    expect(r.flagged).not.toContain('channel');

    const mailQueue = new Queue<MailJob>(QUEUES.mail, { connection: createRedis(ts.server.config, { forBullmq: true }), prefix: ts.server.config.REDIS_PREFIX });
    try {
      const jobs = await mailQueue.getJobs(['waiting', 'delayed', 'active', 'completed', 'failed']);
      const drift = jobs.filter((j) => j.data.purpose === 'drift-alert');
      expect(drift).toHaveLength(1);
      expect(drift[0].data.to).toContain('scientist@demo.test');
      expect(drift[0].data.text).toMatch(/amount: PSI \d\.\d{3}/);
      expect(drift[0].data.text).not.toMatch(/\d{12,}/);
    } finally {
      await mailQueue.close();
    }
  });
});
