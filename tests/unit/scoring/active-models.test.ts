/**
 * ActiveModels (server/src/scoring/active-models.ts): when a scoring process loads the champion,
 * challenger and alerting settings. The product's own rules (no outside reference applies):
 *   - the first current() waits for a load, and callers at the same moment share it;
 *   - the periodic check runs in the background: current() answers from memory meanwhile;
 *   - after an event (invalidate) the next current() waits for the load that follows it, even when
 *     a background load was already under way when the event came;
 *   - with no champion yet, every current() looks again.
 * The registry and settings reads are replaced by counters; the integration tests run the real ones.
 */
import { afterEach, describe, expect, it, vi } from 'vitest';

const db = vi.hoisted(() => ({
  fingerprint: 'champion:1',
  championId: 1 as number | null,
  threshold: 0.5,
  loads: 0,
  fingerprints: 0,
  gate: null as null | Promise<void>,
}));

vi.mock('../../../server/src/model-registry/model-repository', () => ({
  activeModelsFingerprint: async () => {
    db.fingerprints += 1;
    if (db.gate) await db.gate;
    return db.fingerprint;
  },
  loadActiveModels: async () => {
    db.loads += 1;
    return { champion: db.championId === null ? null : { id: db.championId, label: `v${db.championId}` }, challenger: null };
  },
}));
vi.mock('../../../server/src/settings/settings-repository', () => ({
  readAlertingSettings: async () => ({ threshold: db.threshold }),
}));

const { ActiveModels } = await import('../../../server/src/scoring/active-models');
type Models = InstanceType<typeof ActiveModels>;

const opened: Models[] = [];
const open = (refreshMs = 60_000) => {
  const m = new ActiveModels({} as never, refreshMs);
  opened.push(m);
  return m;
};
const tick = () => new Promise((r) => setImmediate(r));

afterEach(() => {
  for (const m of opened.splice(0)) m.close();
  Object.assign(db, { fingerprint: 'champion:1', championId: 1, threshold: 0.5, loads: 0, fingerprints: 0, gate: null });
  vi.useRealTimers();
});

describe('ActiveModels', () => {
  it('waits for the first load, shared by callers at the same moment, then answers from memory', async () => {
    const m = open();
    const [a, b] = await Promise.all([m.current(), m.current()]);
    expect(a.champion?.id).toBe(1);
    expect(b.champion?.id).toBe(1);
    expect(db.loads).toBe(1);
    await m.current();
    await m.current();
    expect(db.fingerprints).toBe(1);
  });

  it('checks in the background every refresh interval and picks up a new champion without blocking a caller', async () => {
    vi.useFakeTimers({ toFake: ['setInterval', 'clearInterval'] });
    const m = open(5_000).start();
    await m.current();
    db.fingerprint = 'champion:2';
    db.championId = 2;
    let release!: () => void;
    db.gate = new Promise<void>((r) => (release = r));
    vi.advanceTimersByTime(5_000);
    // The check is under way (held at the fingerprint read): a caller is answered from memory at once.
    expect((await m.current()).champion?.id).toBe(1);
    release();
    db.gate = null;
    await tick();
    await tick();
    expect((await m.current()).champion?.id).toBe(2);
  });

  it('after an event, makes the next caller wait for the load that follows it, even behind a load already under way', async () => {
    const m = open();
    await m.current();
    let release!: () => void;
    db.gate = new Promise<void>((r) => (release = r));
    m.invalidate(); // a load starts and is held at the fingerprint read, before the change below
    db.threshold = 0.9;
    db.fingerprint = 'champion:3';
    db.championId = 3;
    m.invalidate(); // the change's own event
    const next = m.current();
    release();
    db.gate = null;
    const got = await next;
    expect(got.settings.threshold).toBe(0.9);
    expect(got.champion?.id).toBe(3);
  });

  it('looks again on every use while there is no champion', async () => {
    db.championId = null;
    const m = open();
    expect((await m.current()).champion).toBeNull();
    expect((await m.current()).champion).toBeNull();
    expect(db.loads).toBe(2);
    db.championId = 4;
    expect((await m.current()).champion?.id).toBe(4);
  });
});
