import { describe, expect, it } from 'vitest';
import RedisMock from 'ioredis-mock';
import type { Redis } from 'ioredis';
import { VelocityStore, type VelocityEvent } from '../../server/src/scoring/velocity';

const T0 = Date.parse('2026-11-30T12:00:00Z');
const ev = (id: string, minutes: number, amount: number, extra: Partial<VelocityEvent> = {}): VelocityEvent => ({
  transactionId: id,
  occurredAt: new Date(T0 + minutes * 60_000),
  amount,
  merchantRef: 'm-1',
  merchantCountry: 'US',
  lat: null,
  lon: null,
  deviceId: null,
  ...extra,
});

function store() {
  return new VelocityStore(new RedisMock() as unknown as Redis, 'unit');
}

// Mean Earth radius R = 6371.0088 km (IUGG). On a sphere an arc of θ radians is R·θ, so one
// degree of latitude is 2πR/360 = 111.195 km and a quarter meridian is πR/2 = 10,007.56 km.
const R = 6371.0088;

describe('velocity state (ioredis-mock)', () => {
  it('counts and sums the hour and the day before each transaction, excluding the transaction itself', async () => {
    const s = store();
    expect((await s.observe('c1', ev('a', 0, 10))).count24h).toBe(0);
    await s.observe('c1', ev('b', 10, 1.5, { merchantRef: 'm-2' }));
    await s.observe('c1', ev('c', 70, 20));
    const snap = await s.observe('c1', ev('d', 80, 5));
    // In the hour before minute 80: b (min 10 is 70 min before: out), c (min 70: in) → 1 txn, 20.00.
    expect(snap.count1h).toBe(1);
    expect(snap.sum1h).toBeCloseTo(20, 9);
    expect(snap.count24h).toBe(3);
    expect(snap.sum24h).toBeCloseTo(31.5, 9);
    expect(snap.distinctMerchants24h).toBe(2);
    expect(snap.secondsSincePrev).toBe(600);
    expect(snap.usualAmount).toBeCloseTo((10 + 1.5 + 20) / 3, 9);
  });

  it('counts tiny amounts in the last hour (card-testing signal)', async () => {
    const s = store();
    for (let i = 0; i < 6; i += 1) await s.observe('c2', ev(`t${i}`, i, 0.99));
    const snap = await s.observe('c2', ev('big', 7, 900));
    expect(snap.small1h).toBe(6);
  });

  it('returns the first snapshot again when a transaction is replayed, counting it once', async () => {
    const s = store();
    await s.observe('c3', ev('a', 0, 10));
    const first = await s.observe('c3', ev('b', 5, 10));
    const replay = await s.observe('c3', ev('b', 5, 10));
    expect(replay).toEqual(first);
    const next = await s.observe('c3', ev('c', 6, 10));
    expect(next.count1h).toBe(2);
  });

  it('places a late transaction by its own time', async () => {
    const s = store();
    await s.observe('c4', ev('late-neighbour', 100, 10));
    const late = await s.observe('c4', ev('late', 30, 10));
    expect(late.count1h).toBe(0);
    expect(late.secondsSincePrev).toBeNull();
  });

  it('measures great-circle distance from the previous located transaction', async () => {
    const s = store();
    await s.observe('c5', ev('a', 0, 10, { lat: 0, lon: 0 }));
    const oneDegree = await s.observe('c5', ev('b', 60, 10, { lat: 1, lon: 0 }));
    expect(oneDegree.distanceKm!).toBeCloseTo((2 * Math.PI * R) / 360, 3);
    await s.observe('c6', ev('a', 0, 10, { lat: 0, lon: 0 }));
    const quarter = await s.observe('c6', ev('b', 60, 10, { lat: 90, lon: 0 }));
    expect(quarter.distanceKm!).toBeCloseTo((Math.PI * R) / 2, 3);
  });

  it('flags a device new to an established card, and keeps the home country of first use', async () => {
    const s = store();
    const first = await s.observe('c7', ev('a', 0, 10, { deviceId: 'd1' }));
    expect(first.newDevice).toBe(false);
    expect(first.homeCountry).toBe('US');
    expect((await s.observe('c7', ev('b', 1, 10, { deviceId: 'd1' }))).newDevice).toBe(false);
    const other = await s.observe('c7', ev('c', 2, 10, { deviceId: 'd2', merchantCountry: 'FR' }));
    expect(other.newDevice).toBe(true);
    expect(other.homeCountry).toBe('US');
    expect((await s.observe('c7', ev('d', 3, 10))).newDevice).toBeNull();
  });

  it('keeps cards apart and pipelines many observations in order', async () => {
    const s = store();
    const snaps = await s.observeMany([
      { cardKey: 'x', event: ev('x1', 0, 1) },
      { cardKey: 'y', event: ev('y1', 0, 1) },
      { cardKey: 'x', event: ev('x2', 1, 1) },
    ]);
    expect(snaps.map((v) => v.count1h)).toEqual([0, 0, 1]);
  });
});
