/**
 * Training as a BullMQ job, end to end: "train now" over the API, the
 * training worker (in process, boosting in a worker thread), progress events
 * over the socket, the challenger registered with metrics equal to the
 * engine's own evaluation recomputed here, cancellation, and the nightly job
 * scheduler staying one however often it is registered. Data: invented,
 * seeded labelled history in a window of its own (fixture only).
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { QueryTypes } from 'sequelize';
import type { Socket } from 'socket.io-client';
import { TRAINING_PROGRESS_EVENT, type TrainingProgressEvent } from '../../shared/src/api/models';
import { compileModel, evaluate, parseModel } from '../../shared/src/model/index';
import { buildDataset, sliceSet } from '../../server/src/training/build-dataset';
import { trapezoidArea } from '../../server/src/training/evaluation-curves';
import { NIGHTLY_SCHEDULER_ID, TrainingQueue } from '../../server/src/training/training-queue';
import { createTrainingWorker } from '../../workers/src/training.worker';
import request from 'supertest';
import { connectSocket, csrfToken, DEMO_PASSWORD, sessionCookieOf, signedInAgent, startTestServer, type Agent, type TestServer } from './helpers/test-server';
import { seedLabelledHistory } from './helpers/labelled-history';

const FROM = new Date('2020-01-06T00:00:00.000Z');
const TO = new Date('2020-03-02T00:00:00.000Z');
const WINDOW_DAYS = Math.round((TO.getTime() - FROM.getTime()) / 86_400_000);

let ts: TestServer;
let ds: { agent: Agent; csrf: string };
let socket: Socket;
let worker: Awaited<ReturnType<typeof createTrainingWorker>>;
const events: TrainingProgressEvent[] = [];

async function waitFor<T>(fn: () => Promise<T | null | undefined | false> | T | null | undefined | false, timeoutMs = 60_000): Promise<T> {
  const end = Date.now() + timeoutMs;
  for (;;) {
    const v = await fn();
    if (v) return v;
    if (Date.now() > end) throw new Error('timed out waiting');
    await new Promise((r) => setTimeout(r, 50));
  }
}

async function signInSocket(): Promise<Socket> {
  const agent = request.agent(ts.server.http);
  const token = await csrfToken(agent);
  const login = await agent.post('/api/auth/login').set('X-CSRF-Token', token).send({ email: 'scientist@demo.test', password: DEMO_PASSWORD });
  const s = connectSocket(ts.baseUrl, sessionCookieOf(login));
  await new Promise<void>((resolve, reject) => {
    s.once('hello', () => resolve());
    s.once('connect_error', reject);
  });
  return s;
}

beforeAll(async () => {
  ts = await startTestServer();
  await seedLabelledHistory(ts.server.db, { from: FROM, to: TO, rows: 8000, seed: 4242, prefix: `train-it-${Date.now().toString(36)}` });
  ds = await signedInAgent(ts, 'data_scientist');
  socket = await signInSocket();
  socket.on(TRAINING_PROGRESS_EVENT, (e: TrainingProgressEvent) => events.push(e));
  worker = await createTrainingWorker(ts.server.config, ts.server.db);
}, 90_000);

afterAll(async () => {
  socket?.disconnect();
  await worker?.close();
  await ts?.close();
});

const startRun = (body: Record<string, unknown>) => ds.agent.post('/api/training/runs').set('X-CSRF-Token', ds.csrf).send(body);

describe('a training run', () => {
  it('reports every round over the socket and registers a challenger whose metrics are the engine’s own evaluation', async () => {
    const label = `it-${Date.now().toString(36)}`;
    const res = await startRun({ to: TO.toISOString(), windowDays: WINDOW_DAYS, rounds: 60, labelDelayDays: 30, label });
    expect(res.status).toBe(202);
    const runId: number = res.body.run.id;
    expect(['queued', 'running']).toContain(res.body.run.status);

    const done = await waitFor(() => events.find((e) => e.runId === runId && e.status === 'completed'));
    const mine = events.filter((e) => e.runId === runId);
    // k of T while it runs, losses with it.
    const running = mine.filter((e) => e.status === 'running' && e.round > 0);
    expect(running.length).toBeGreaterThan(0);
    expect(running[0].totalRounds).toBe(60);
    expect(running.every((e) => e.trainLoss !== null && e.validationLoss !== null)).toBe(true);
    for (let k = 1; k < mine.length; k++) expect(mine[k].round).toBeGreaterThanOrEqual(mine[k - 1].round);
    expect(mine.some((e) => e.phase === 'boosting')).toBe(true);
    // Throttled events, yet every round's loss reaches the page exactly once, in order.
    const rounds = mine.flatMap((e) => e.points.map((p) => p.round));
    const [row] = await ts.server.db.sequelize.query<{ role: string; label: string; model_json: string; metrics: string }>(
      'SELECT role, label, model_json, metrics FROM model_versions WHERE id = ?',
      { replacements: [done.modelVersionId], type: QueryTypes.SELECT },
    );
    const model = parseModel(row.model_json);
    const metrics = JSON.parse(row.metrics);
    expect(rounds).toEqual(Array.from({ length: model.training.roundsRun }, (_, i) => i + 1));
    expect(row.role).toBe('challenger');
    expect(row.label).toBe(label);

    // The evaluation recomputed here from the stored model and the same time-ordered split.
    const data = await buildDataset(ts.server.db, { from: FROM, to: TO, labelsAsOf: new Date(), labelDelayDays: 30 });
    const n = data.counts.rows;
    expect(n).toBe(8000);
    const test = sliceSet(data, Math.floor(n * (1 - 0.15)), n);
    const compiled = compileModel(model);
    const margin = compiled.scoreColumns(test.set.columns);
    const scores = {
      margin,
      probability: Float64Array.from(margin, (m) => compiled.probability(m)),
      normalizedMargin: Float64Array.from(margin, (m) => m / compiled.totalAlpha),
    };
    const expected = evaluate(scores, test.set.labels, { timestamps: test.timestamps, dailyBudget: 50, amounts: test.amounts });
    expect(metrics.evaluation).toEqual(JSON.parse(JSON.stringify(expected)));
    expect(metrics.evaluation.rocAuc).toBeGreaterThan(0.7);
    // Stored curves: their area is the AUC (down-sampling moves it a little), and the drift baseline is there.
    expect(Math.abs(trapezoidArea(metrics.curves.roc) - expected.rocAuc)).toBeLessThan(0.01);
    expect(metrics.curves.roc.length).toBeLessThanOrEqual(300);
    expect(metrics.baseline.features.map((f: { feature: string }) => f.feature)).toEqual(model.features.map((f) => f.name));

    const run = await ds.agent.get(`/api/training/runs/${runId}`).expect(200);
    expect(run.body.run).toMatchObject({ status: 'completed', modelVersionId: done.modelVersionId, modelVersionLabel: label });
    expect(run.body.run.curve).toHaveLength(model.training.roundsRun);
    const detail = await ds.agent.get(`/api/models/${done.modelVersionId}`).expect(200);
    expect(detail.body.version.roundTable).toHaveLength(model.training.roundsRun);
    expect(detail.body.version.stepFunctions.length).toBeGreaterThan(0);
    expect(detail.body.version.role).toBe('challenger');
  });

  it('a second run replaces the challenger; the first goes back to candidate', async () => {
    const res = await startRun({ to: TO.toISOString(), windowDays: WINDOW_DAYS, rounds: 20, labelDelayDays: 30 });
    const runId: number = res.body.run.id;
    const done = await waitFor(() => events.find((e) => e.runId === runId && e.status === 'completed'));
    const rows = await ts.server.db.sequelize.query<{ id: number }>("SELECT id FROM model_versions WHERE role = 'challenger'", { type: QueryTypes.SELECT });
    expect(rows.map((r) => Number(r.id))).toEqual([done.modelVersionId]);

    // Side by side on the newer version's test window: re-scored from the stored features, the newer
    // version's figures are its own test evaluation again.
    const first = events.find((e) => e.status === 'completed' && e.modelVersionId !== done.modelVersionId)!.modelVersionId!;
    const cmp = await ds.agent.get(`/api/models/compare?a=${first}&b=${done.modelVersionId}`).expect(200);
    const [stored] = await ts.server.db.sequelize.query<{ metrics: string }>('SELECT metrics FROM model_versions WHERE id = ?', {
      replacements: [done.modelVersionId],
      type: QueryTypes.SELECT,
    });
    const own = JSON.parse(stored.metrics).evaluation;
    expect(cmp.body.rows).toBe(own.n);
    expect(cmp.body.fraud).toBe(own.fraud);
    const newer = cmp.body.versions.find((v: { id: number }) => v.id === done.modelVersionId);
    expect(newer.rocAuc).toBeCloseTo(own.rocAuc, 12);
    expect(newer.averagePrecision).toBeCloseTo(own.averagePrecision, 12);
    expect(newer.overlapsTraining).toBe(false);
    expect(cmp.body.versions.map((v: { id: number }) => v.id)).toEqual([first, done.modelVersionId]);
  });

  it('cancels a queued run at once and a running one after its current round, registering nothing', async () => {
    const versionsBefore = await ts.server.db.sequelize.query('SELECT id FROM model_versions', { type: QueryTypes.SELECT });
    // Queued: with no training worker running, the run waits in the queue.
    await worker.close();
    const queued = await startRun({ to: TO.toISOString(), windowDays: WINDOW_DAYS, rounds: 20 });
    expect(queued.body.run.status).toBe('queued');
    const cancelQueued = await ds.agent.post(`/api/training/runs/${queued.body.run.id}/cancel`).set('X-CSRF-Token', ds.csrf).send({});
    expect(cancelQueued.status).toBe(200);
    expect(cancelQueued.body.run.status).toBe('cancelled');
    worker = await createTrainingWorker(ts.server.config, ts.server.db);

    // Running: a long budget with a tiny step, cancelled once boosting has started.
    const long = await startRun({ to: TO.toISOString(), windowDays: WINDOW_DAYS, rounds: 5000, shrinkage: 0.002, labelDelayDays: 30 });
    const runId: number = long.body.run.id;
    await waitFor(() => events.find((e) => e.runId === runId && e.phase === 'boosting'));
    const cancel = await ds.agent.post(`/api/training/runs/${runId}/cancel`).set('X-CSRF-Token', ds.csrf).send({});
    expect(cancel.status).toBe(200);
    expect(cancel.body.run.cancelRequested).toBe(true);
    const last = await waitFor(() => events.find((e) => e.runId === runId && e.status !== 'running'));
    expect(last.status).toBe('cancelled');
    expect(last.round).toBeLessThan(5000);
    expect(last.modelVersionId).toBeNull();
    const versionsAfter = await ts.server.db.sequelize.query('SELECT id FROM model_versions', { type: QueryTypes.SELECT });
    expect(versionsAfter.length).toBe(versionsBefore.length);
    const stored = await ds.agent.get(`/api/training/runs/${runId}`).expect(200);
    expect(stored.body.run.status).toBe('cancelled');
    // The queued one never ran.
    const q = await ds.agent.get(`/api/training/runs/${queued.body.run.id}`).expect(200);
    expect(q.body.run).toMatchObject({ status: 'cancelled', startedAt: null });
  });

  it('a run on a window without labelled rows fails with the reason in words', async () => {
    const res = await startRun({ to: '2001-03-01T00:00:00.000Z', windowDays: 30, rounds: 20 });
    const runId: number = res.body.run.id;
    const last = await waitFor(() => events.find((e) => e.runId === runId && e.status !== 'running'));
    expect(last.status).toBe('failed');
    expect(last.error).toMatch(/too few|empty/i);
  });
});

describe('the nightly schedule', () => {
  it('validates the cron pattern and the time zone', async () => {
    const bad = await ds.agent
      .put('/api/training/schedule')
      .set('X-CSRF-Token', ds.csrf)
      .send({ enabled: true, cron: '* * * * *', timezone: 'Mars/Olympus', windowDays: 60, rounds: 100, labelDelayDays: 21 });
    expect(bad.status).toBe(400);
    const paths = bad.body.error.fields.map((f: { path: string }) => f.path).sort();
    expect(paths).toEqual(['cron', 'timezone']);
  });

  it('is one job scheduler however many processes register it, and survives a restart', async () => {
    const saved = await ds.agent
      .put('/api/training/schedule')
      .set('X-CSRF-Token', ds.csrf)
      .send({ enabled: true, cron: '30 1 * * *', timezone: 'Europe/Berlin', windowDays: 45, rounds: 150, labelDelayDays: 21 });
    expect(saved.status).toBe(200);
    expect(saved.body.schedule).toMatchObject({ cron: '30 1 * * *', timezone: 'Europe/Berlin' });
    expect(Date.parse(saved.body.nextRunAt)).toBeGreaterThan(Date.now());

    // Two more worker processes start (each registers the scheduler from the saved schedule), then stop.
    const env = { ...process.env, ...Object.fromEntries(Object.entries(ts.server.config).map(([k, v]) => [k, String(v)])), LOG_LEVEL: 'info' };
    const started = (child: ChildProcess) =>
      new Promise<void>((resolve, reject) => {
        let out = '';
        const timer = setTimeout(() => reject(new Error(`worker did not start: ${out}`)), 45_000);
        child.stdout!.on('data', (b: Buffer) => {
          out += b.toString();
          if (out.includes('workers running')) {
            clearTimeout(timer);
            resolve();
          }
        });
        child.on('exit', (code) => reject(new Error(`worker exited ${code}: ${out}`)));
      });
    const children = [0, 1].map(() => spawn(process.execPath, ['--import', 'tsx', 'workers/src/index.ts', '--only=training'], { env, stdio: ['ignore', 'pipe', 'pipe'] }));
    try {
      await Promise.all(children.map(started));
    } finally {
      for (const c of children) c.kill('SIGTERM');
      await Promise.all(children.map((c) => new Promise((r) => (c.exitCode !== null ? r(null) : c.once('exit', r)))));
    }

    const q = new TrainingQueue(ts.server.config, { failFast: false, name: 'test-inspector' });
    try {
      // And once more in this process, as a restart of the worker would.
      await q.applySchedule(saved.body.schedule);
      const schedulers = await q.queue.getJobSchedulers();
      expect(schedulers.map((s) => s.key)).toEqual([NIGHTLY_SCHEDULER_ID]);
      expect(schedulers[0]).toMatchObject({ pattern: '30 1 * * *', tz: 'Europe/Berlin' });
      // One pending job for the next night, not one per registration.
      expect(await q.queue.getDelayedCount()).toBe(1);
      const view = await ds.agent.get('/api/training/schedule').expect(200);
      expect(view.body.nextRunAt).toBe(new Date(schedulers[0].next!).toISOString());
    } finally {
      await q.close();
    }
  }, 90_000);
});
