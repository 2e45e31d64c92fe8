import { isIPv4, isIPv6 } from 'node:net';
import { beforeAll, describe, expect, it } from 'vitest';
import {
  createDemoWorld,
  ipRegion,
  toIngestPayload,
  type DemoWorld,
  type SimulatedTransaction,
} from '../../server/src/demo/simulator/index';

// The demo world's figures (seeds, dates, counts) are invented inputs; every
// check below compares against an outside definition named beside it, or
// against the generator's own configuration.

/** Luhn check of ISO/IEC 7812-1 Annex B: double every second digit from the right, the sum is a multiple of 10. */
function luhnValid(digits: string): boolean {
  let sum = 0;
  for (let i = 0; i < digits.length; i++) {
    let d = Number(digits[digits.length - 1 - i]);
    if (i % 2 === 1) d = d * 2 > 9 ? d * 2 - 9 : d * 2;
    sum += d;
  }
  return sum % 10 === 0;
}

/** ISO 4217 minor units of the currencies the demo may use. */
const ISO4217_DECIMALS: Record<string, number> = { USD: 2, EUR: 2, GBP: 2, CAD: 2, MXN: 2, JPY: 0 };

/** RFC 5737 section 3: TEST-NET-1, -2 and -3 are the IPv4 blocks for documentation. */
const RFC5737_PREFIXES = ['192.0.2.', '198.51.100.', '203.0.113.'];

/** RFC 3849: 2001:db8::/32 is the IPv6 prefix for documentation (first two groups 2001:0db8). */
function inRfc3849(ip: string): boolean {
  const groups = ip.toLowerCase().split(':');
  return parseInt(groups[0], 16) === 0x2001 && parseInt(groups[1], 16) === 0x0db8;
}

function isDocumentationIp(ip: string): boolean {
  if (isIPv4(ip)) return RFC5737_PREFIXES.some((p) => ip.startsWith(p));
  return isIPv6(ip) && inRfc3849(ip);
}

/** Great-circle distance, haversine formula (R. W. Sinnott, Sky & Telescope 68(2), 1984), mean Earth radius 6371.0088 km (IUGG). */
function haversineKm(a: { lat: number; lon: number }, b: { lat: number; lon: number }): number {
  const rad = Math.PI / 180;
  const s = Math.sin(((b.lat - a.lat) * rad) / 2) ** 2 + Math.cos(a.lat * rad) * Math.cos(b.lat * rad) * Math.sin(((b.lon - a.lon) * rad) / 2) ** 2;
  return 2 * 6371.0088 * Math.asin(Math.sqrt(s));
}

const speedKmh = (a: SimulatedTransaction, b: SimulatedTransaction) =>
  haversineKm(a.location!, b.location!) / ((Date.parse(b.occurredAt) - Date.parse(a.occurredAt)) / 3_600_000);

/** Local hour by the IANA time zone database as Node's ICU carries it. */
function localHourIn(zone: string, iso: string): number {
  return Number(new Intl.DateTimeFormat('en-GB', { timeZone: zone, hour: '2-digit', hourCycle: 'h23' }).format(new Date(iso)));
}

const CHANNELS = new Set(['pos', 'ecommerce', 'atm', 'moto', 'contactless']);
const PRESENT_CHANNELS = new Set(['pos', 'atm', 'contactless']);
const PAYLOAD_KEYS = new Set(['id', 'occurredAt', 'amount', 'currency', 'card', 'merchant', 'cardPresent', 'channel', 'deviceId', 'ip', 'location']);
const usd = (t: SimulatedTransaction) => t.currency === 'USD' ? Number(t.amount) : Number.NaN;

const take = <T,>(it: Iterable<T>, n: number): T[] => {
  const out: T[] = [];
  for (const x of it) {
    out.push(x);
    if (out.length >= n) break;
  }
  return out;
};

const DAY = 86_400_000;
const FROM = new Date('2026-10-01T00:00:00Z');
const TO = new Date(FROM.getTime() + 30 * DAY);
const FRAUD_RATE = 0.01;
const LEGIT_LABEL_SHARE = 0.3;

describe('demo simulator: world', { timeout: 30_000 }, () => {
  it('gives every cardholder one Luhn-valid 16-digit card under the issuer BIN, none repeated', () => {
    const world = createDemoWorld({ seed: 7, cardholders: 2000 });
    expect(world.cards).toHaveLength(2000);
    const numbers = new Set(world.cards.map((c) => c.number));
    expect(numbers.size).toBe(2000);
    for (const card of world.cards) {
      expect(card.number).toMatch(/^\d{16}$/);
      expect(luhnValid(card.number)).toBe(true);
      // ISO/IEC 7812-1: the first digit is the major industry identifier; 9 is assigned to national use.
      expect(card.number[0]).toBe('9');
      expect(card.number.startsWith(world.issuer.bin)).toBe(true);
      expect(card.last4).toBe(card.number.slice(-4));
    }
    // Card numbers live on the cards only: the cardholder records carry none.
    const holders = JSON.stringify(world.cardholders);
    expect(world.cards.filter((c) => holders.includes(c.number))).toEqual([]);
  });

  it('builds the asked number of merchants with four-digit ISO 18245 codes and two-letter countries', () => {
    const world = createDemoWorld({ seed: 7, cardholders: 10, merchants: 250 });
    expect(world.merchants).toHaveLength(250);
    expect(new Set(world.merchants.map((m) => m.id)).size).toBe(250);
    expect(new Set(world.merchants.map((m) => m.name)).size).toBe(250);
    for (const m of world.merchants) {
      // ISO 18245: four digits, 0000 unassigned.
      expect(m.mcc).toMatch(/^\d{4}$/);
      expect(m.mcc).not.toBe('0000');
      expect(m.country).toMatch(/^[A-Z]{2}$/);
    }
    expect(() => createDemoWorld({ seed: 7, merchants: 20 })).toThrow(RangeError);
    expect(() => createDemoWorld({ seed: 7, cardholders: 0 })).toThrow(RangeError);
  });

  it('is deterministic for a seed and differs between seeds', () => {
    const span = { from: FROM, to: new Date(FROM.getTime() + 2 * DAY) };
    const a = take(createDemoWorld({ seed: 42, cardholders: 500 }).history(span), 400);
    const b = take(createDemoWorld({ seed: 42, cardholders: 500 }).history(span), 400);
    const c = take(createDemoWorld({ seed: 43, cardholders: 500 }).history(span), 400);
    expect(a).toHaveLength(400);
    expect(JSON.stringify(b)).toBe(JSON.stringify(a));
    expect(JSON.stringify(c)).not.toBe(JSON.stringify(a));
    const startAt = new Date('2026-12-01T10:00:00Z');
    const l1 = take(createDemoWorld({ seed: 42, cardholders: 500 }).live({ startAt, ratePerSecond: 3 }), 300);
    const l2 = take(createDemoWorld({ seed: 42, cardholders: 500 }).live({ startAt, ratePerSecond: 3 }), 300);
    expect(JSON.stringify(l2)).toBe(JSON.stringify(l1));
  });

  it('yields the same transactions for a span whether generated whole or in chunks', () => {
    const world = createDemoWorld({ seed: 11, cardholders: 400 });
    const mid = new Date(FROM.getTime() + 2 * DAY + 5 * 3_600_000);
    const end = new Date(FROM.getTime() + 4 * DAY);
    const whole = [...world.history({ from: FROM, to: end })].map((t) => t.id);
    const chunks = [...world.history({ from: FROM, to: mid }), ...world.history({ from: mid, to: end })].map((t) => t.id);
    expect(chunks).toEqual(whole);
  });
});

describe('demo simulator: 30 days of history', { timeout: 30_000 }, () => {
  let world: DemoWorld;
  let txs: SimulatedTransaction[];
  const byIncident = new Map<string, SimulatedTransaction[]>();

  beforeAll(() => {
    world = createDemoWorld({ seed: 2026, cardholders: 3000 });
    txs = [...world.history({ from: FROM, to: TO, fraudRate: FRAUD_RATE, legitLabelShare: LEGIT_LABEL_SHARE })];
    for (const t of txs) {
      if (!t.truth.fraud || !t.truth.incidentId) continue;
      const list = byIncident.get(t.truth.incidentId) ?? [];
      list.push(t);
      byIncident.set(t.truth.incidentId, list);
    }
  }, 120_000);

  const incidents = (pattern: string) => [...byIncident.values()].filter((l) => l[0].truth.pattern === pattern);

  /** Plain checks collected as messages: a hundred thousand transactions are too many for one expect each. */
  function problems(check: (t: SimulatedTransaction) => string | null): string[] {
    const out: string[] = [];
    for (const t of txs) {
      const p = check(t);
      if (p !== null && out.push(`${t.id}: ${p}`) >= 5) break;
    }
    return out;
  }

  it('stays inside the span, in time order, with unique ids', () => {
    expect(txs.length).toBeGreaterThan(100_000);
    let prev = FROM.getTime();
    expect(
      problems((t) => {
        const at = Date.parse(t.occurredAt);
        const bad = at < prev || at >= TO.getTime();
        prev = at;
        return bad ? `out of order or span at ${t.occurredAt}` : null;
      }),
    ).toEqual([]);
    expect(new Set(txs.map((t) => t.id)).size).toBe(txs.length);
  });

  it('produces payloads of exactly the ingest shape', () => {
    const cards = new Set(world.cards.map((c) => c.number));
    const currencies = new Set<string>();
    const shape = (p: ReturnType<typeof toIngestPayload>): string | null => {
      const extra = Object.keys(p).filter((k) => !PAYLOAD_KEYS.has(k));
      if (extra.length > 0) return `unexpected keys ${extra.join(',')}`;
      if (!/^fh-\d{10}-\d{4,}$/.test(p.id)) return 'id';
      // ISO 8601 in UTC with the Z designator, whole seconds, and a real instant.
      if (!/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}Z$/.test(p.occurredAt) || new Date(p.occurredAt).toISOString().replace('.000', '') !== p.occurredAt) return 'occurredAt';
      const decimals = ISO4217_DECIMALS[p.currency];
      if (decimals === undefined) return `currency ${p.currency}`;
      if (!(decimals === 0 ? /^[1-9]\d*$/ : /^(0|[1-9]\d*)\.\d{2}$/).test(p.amount) || !(Number(p.amount) > 0)) return `amount ${p.amount} ${p.currency}`;
      currencies.add(p.currency);
      if (!cards.has(p.card.number) || !luhnValid(p.card.number)) return 'card number';
      if (!/^ch-\d+$/.test(p.card.cardholderId)) return 'cardholder id';
      if (!/^\d{4}$/.test(p.merchant.mcc) || !/^m-\d+$/.test(p.merchant.id) || p.merchant.name.length === 0) return 'merchant';
      if (!CHANNELS.has(p.channel) || p.cardPresent !== PRESENT_CHANNELS.has(p.channel)) return `channel ${p.channel}/${p.cardPresent}`;
      if (p.ip !== undefined && !isDocumentationIp(p.ip)) return `ip ${p.ip}`;
      if (p.cardPresent && (p.deviceId !== undefined || p.ip !== undefined)) return 'device on a card-present payment';
      if (!p.location || Math.abs(p.location.lat) > 90 || Math.abs(p.location.lon) > 180) return 'location';
      return null;
    };
    expect(problems((t) => ('truth' in toIngestPayload(t) ? 'truth leaked' : shape(toIngestPayload(t))))).toEqual([]);
    expect(currencies.has('USD')).toBe(true);
    expect([...currencies].filter((c) => c !== 'USD').length).toBeGreaterThanOrEqual(3);
    // Online payments carry a device and an address, and some come from the documentation IPv6 block.
    expect(txs.some((t) => t.ip !== undefined && isIPv6(t.ip))).toBe(true);
    expect(txs.filter((t) => !t.cardPresent).every((t) => t.deviceId !== undefined && t.ip !== undefined)).toBe(true);
  });

  it('is mostly domestic dollars', () => {
    const share = txs.filter((t) => t.currency === 'USD').length / txs.length;
    expect(share).toBeGreaterThan(0.9);
    expect(share).toBeLessThan(1);
  });

  it('keeps the card number out of everything but card.number', () => {
    const cards = new Set(world.cards.map((c) => c.number));
    expect(
      problems((t) => {
        const { card, ...rest } = t;
        const leaked = (JSON.stringify(rest).match(/\d{16}/g) ?? []).some((run) => cards.has(run));
        return leaked || !cards.has(card.number) ? 'card number outside card.number' : null;
      }),
    ).toEqual([]);
  });

  it('has the configured share of fraud, inside the product band of 0.5 to 1.5 %', () => {
    const rate = txs.filter((t) => t.truth.fraud).length / txs.length;
    expect(rate).toBeGreaterThan(FRAUD_RATE * 0.75);
    expect(rate).toBeLessThan(FRAUD_RATE * 1.25);
  });

  it('follows another configured fraud rate too', () => {
    const other = createDemoWorld({ seed: 2026, cardholders: 3000 });
    const some = [...other.history({ from: FROM, to: new Date(FROM.getTime() + 14 * DAY), fraudRate: 0.004 })];
    const rate = some.filter((t) => t.truth.fraud).length / some.length;
    expect(rate).toBeGreaterThan(0.004 * 0.75);
    expect(rate).toBeLessThan(0.004 * 1.25);
  });

  it('uses every scenario and every fraud type of the product', () => {
    const patterns = new Set(txs.filter((t) => t.truth.fraud).map((t) => t.truth.pattern));
    expect([...patterns].sort()).toEqual(
      ['account_takeover', 'card_testing', 'cnp_stolen_details', 'counterfeit_abroad', 'first_party_dispute', 'impossible_travel', 'lost_stolen_spree', 'odd_hour_high_risk'],
    );
    const types = new Set(txs.filter((t) => t.truth.fraud).map((t) => t.truth.fraudType));
    expect([...types].sort()).toEqual(['account_takeover', 'card_not_present', 'counterfeit', 'first_party', 'lost_stolen']);
    expect(
      problems((t) =>
        t.truth.fraud ? (t.truth.fraudType && t.truth.pattern && t.truth.incidentId ? null : 'fraud without type') : t.truth.fraudType || t.truth.pattern ? 'legit with a fraud type' : null,
      ),
    ).toEqual([]);
  });

  it('card testing: bursts of at least five tiny card-not-present amounts at digital-goods merchants within minutes on one card', () => {
    const bursts = incidents('card_testing');
    expect(bursts.length).toBeGreaterThan(10);
    for (const burst of bursts) {
      const tiny = burst.filter((t) => !t.cardPresent && Number(t.amount) <= 2 && ISO4217_DECIMALS[t.currency] === 2);
      expect(tiny.length).toBeGreaterThanOrEqual(5);
      expect(new Set(tiny.map((t) => t.card.number)).size).toBe(1);
      // ISO 18245 digital goods: 5815 media, 5816 games, 5817 applications.
      for (const t of tiny) expect(['5815', '5816', '5817']).toContain(t.merchant.mcc);
      const span = Date.parse(tiny[tiny.length - 1].occurredAt) - Date.parse(tiny[0].occurredAt);
      expect(span).toBeLessThanOrEqual(15 * 60_000);
    }
    // Sometimes, not always, a large purchase follows.
    const withBig = bursts.filter((b) => b.some((t) => Number(t.amount) >= 100)).length;
    expect(withBig).toBeGreaterThan(0);
    expect(withBig).toBeLessThan(bursts.length);
  });

  it('impossible travel: the cloned card appears over 1,000 km/h away from the previous card-present use', () => {
    const prevPresent = new Map<string, SimulatedTransaction>();
    const firstFraudIds = new Set(incidents('impossible_travel').map((l) => l[0].id));
    let checked = 0;
    for (const t of txs) {
      if (!t.cardPresent) continue;
      if (firstFraudIds.has(t.id)) {
        const prev = prevPresent.get(t.card.number);
        expect(prev).toBeDefined();
        expect(speedKmh(prev!, t)).toBeGreaterThan(1000);
        checked++;
      }
      prevPresent.set(t.card.number, t);
    }
    expect(checked).toBe(firstFraudIds.size);
    expect(checked).toBeGreaterThan(10);
  });

  it('legitimate card-present use almost never implies impossible travel', () => {
    const prevPresent = new Map<string, SimulatedTransaction>();
    let pairs = 0;
    let impossible = 0;
    for (const t of txs) {
      if (!t.cardPresent) continue;
      const prev = prevPresent.get(t.card.number);
      // Like the product's speed feature, gaps under a minute (same shop, clock skew) carry no speed.
      if (prev && !prev.truth.fraud && !t.truth.fraud && Date.parse(t.occurredAt) - Date.parse(prev.occurredAt) >= 60_000) {
        pairs++;
        if (speedKmh(prev, t) > 1000) impossible++;
      }
      prevPresent.set(t.card.number, t);
    }
    expect(pairs).toBeGreaterThan(50_000);
    expect(impossible / pairs).toBeLessThan(0.001);
  });

  it('odd hours: high-risk categories between 02:00 and 05:00 local, rare among legitimate payments', () => {
    const zoneAt = (loc: { lat: number; lon: number }) =>
      world.cities.reduce((best, c) => (haversineKm(c, loc) < haversineKm(best, loc) ? c : best)).zone;
    const odd = txs.filter((t) => t.truth.pattern === 'odd_hour_high_risk');
    expect(odd.length).toBeGreaterThan(20);
    // ISO 18245: 6011 cash disbursement, 6051 quasi-cash, 7995 betting, 4829 wire transfer / money orders.
    for (const t of odd) {
      expect(['6011', '6051', '7995', '4829']).toContain(t.merchant.mcc);
      const h = localHourIn(zoneAt(t.location!), t.occurredAt);
      expect(h).toBeGreaterThanOrEqual(2);
      expect(h).toBeLessThan(5);
    }
    const legit = txs.filter((t) => !t.truth.fraud);
    const legitOdd = legit.filter((t) => ['6051', '7995', '4829'].includes(t.merchant.mcc) && (() => {
      const h = localHourIn(zoneAt(t.location!), t.occurredAt);
      return h >= 2 && h < 5;
    })()).length;
    expect(legitOdd / legit.length).toBeLessThan(0.001);
  });

  it('account takeover: a never-seen device on a foreign network, then high spend within minutes', () => {
    const seen = new Map<string, Set<string>>();
    const firstSeen = new Map<string, { at: number; device: string; newOnCard: boolean }>();
    for (const t of txs) {
      if (!t.deviceId) continue;
      const devices = seen.get(t.card.number) ?? new Set<string>();
      if (t.truth.pattern === 'account_takeover' && !firstSeen.has(t.truth.incidentId!)) {
        firstSeen.set(t.truth.incidentId!, { at: Date.parse(t.occurredAt), device: t.deviceId, newOnCard: !devices.has(t.deviceId) });
      }
      devices.add(t.deviceId);
      seen.set(t.card.number, devices);
    }
    const sessions = incidents('account_takeover');
    expect(sessions.length).toBeGreaterThan(20);
    for (const s of sessions) {
      const start = firstSeen.get(s[0].truth.incidentId!)!;
      expect(start.newOnCard).toBe(true);
      for (const t of s) {
        expect(t.deviceId).toBe(start.device);
        expect(ipRegion(t.ip!)).toBe('foreign');
        expect(t.cardPresent).toBe(false);
      }
      // High spend: electronics 5732, jewellery 5944, wire transfer 4829 or general merchandise 5399 (ISO 18245), 300 dollars or more.
      const big = s.filter((t) => ['5732', '5944', '4829', '5399'].includes(t.merchant.mcc) && usd(t) >= 300);
      expect(big.length).toBeGreaterThan(0);
      expect(Date.parse(big[0].occurredAt) - start.at).toBeLessThanOrEqual(30 * 60_000);
    }
  });

  it('counterfeit abroad: card-present use in another country', () => {
    const abroad = txs.filter((t) => t.truth.pattern === 'counterfeit_abroad');
    expect(abroad.length).toBeGreaterThan(20);
    for (const t of abroad) {
      expect(t.cardPresent).toBe(true);
      expect(t.merchant.country).not.toBe(world.issuer.country);
      expect(t.truth.fraudType).toBe('counterfeit');
    }
  });

  it('labels: fraud reported 3 to 45 days later, a configured share of legitimate ones ever labelled', () => {
    const fraud = txs.filter((t) => t.truth.fraud);
    const reported = fraud.filter((t) => t.truth.wouldBeLabelled);
    expect(reported.length / fraud.length).toBeGreaterThan(0.7);
    expect(reported.length).toBeLessThan(fraud.length);
    for (const t of fraud) {
      if (!t.truth.wouldBeLabelled) {
        expect(t.truth.labelReportedAt).toBeUndefined();
        continue;
      }
      const days = (t.truth.labelReportedAt!.getTime() - Date.parse(t.occurredAt)) / DAY;
      expect(days).toBeGreaterThanOrEqual(3);
      expect(days).toBeLessThanOrEqual(45);
    }
    const legit = txs.filter((t) => !t.truth.fraud);
    const labelled = legit.filter((t) => t.truth.wouldBeLabelled);
    expect(Math.abs(labelled.length / legit.length - LEGIT_LABEL_SHARE)).toBeLessThan(0.01);
    for (const t of labelled.slice(0, 2000)) expect(t.truth.labelReportedAt!.getTime()).toBeGreaterThan(Date.parse(t.occurredAt));
  });
});

describe('demo simulator: live stream', { timeout: 30_000 }, () => {
  const startAt = new Date('2026-12-01T15:30:00Z');

  it('runs from startAt in time order with its own ids at about the asked rate', () => {
    const world = createDemoWorld({ seed: 5, cardholders: 3000 });
    const hour: SimulatedTransaction[] = [];
    for (const t of world.live({ startAt, ratePerSecond: 5 })) {
      if (Date.parse(t.occurredAt) >= startAt.getTime() + 3_600_000) break;
      hour.push(t);
    }
    expect(hour.length / 3600).toBeGreaterThan(4.5);
    expect(hour.length / 3600).toBeLessThan(5.5);
    let prev = startAt.getTime();
    for (const t of hour) {
      const at = Date.parse(t.occurredAt);
      expect(at).toBeGreaterThanOrEqual(prev);
      prev = at;
      expect(t.id.startsWith('fl-')).toBe(true);
    }
    expect(new Set(hour.map((t) => t.id)).size).toBe(hour.length);
    // The population grows with the rate, so a card still pays about as often as a real one: most cards once in the hour.
    const legit = hour.filter((t) => !t.truth.fraud);
    expect(new Set(legit.map((t) => t.card.number)).size / legit.length).toBeGreaterThan(0.9);
    const later = take(world.live({ startAt: new Date(startAt.getTime() + 1000), ratePerSecond: 5 }), 2000);
    const ids = new Set(hour.map((t) => t.id));
    expect(later.some((t) => ids.has(t.id))).toBe(false);
  });

  it('at its own pace follows the world: a few thousand payments a day for a few thousand cardholders', () => {
    const world = createDemoWorld({ seed: 5, cardholders: 1000 });
    let n = 0;
    for (const t of world.live({ startAt })) {
      if (Date.parse(t.occurredAt) >= startAt.getTime() + DAY) break;
      n++;
    }
    const expected = world.cardholders.reduce((s, c) => s + c.habits.txPerDay, 0);
    expect(n / expected).toBeGreaterThan(0.85);
    expect(n / expected).toBeLessThan(1.15);
  });
});
