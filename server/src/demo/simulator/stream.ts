import { LIVE_RHYTHM_FLOOR, whereabouts, type Member, type PopulationTables } from './cardholders';
import { MEAN_FRAUD_TX_PER_INCIDENT, PATTERNS, PATTERN_CUM, type FraudContext } from './fraud-patterns';
import { legitDraft } from './legit';
import type { MerchantDirectory } from './merchants';
import { localHour } from './places';
import { Rng, hash32 } from './prng';
import { finalise, type Draft, type LabelPolicy, type SimulatedTransaction } from './payload';
import { TAG } from './tags';

/** What the stream engine needs from the world. */
export interface Population {
  readonly seed: number;
  readonly dir: MerchantDirectory;
  readonly size: number;
  readonly tables: PopulationTables;
  member(index: number): Member;
}

export interface StreamSpec extends LabelPolicy {
  population: Population;
  fraudRate: number;
  /** First instant emitted (epoch ms). */
  fromMs: number;
  /** First instant not emitted; Infinity for the live feed. */
  toMs: number;
  /** Where windows start: generation is cut at multiples of `windowMs` after it (whole seconds). */
  originMs: number;
  windowMs: number;
  /**
   * How far before `fromMs` generation starts, so scenarios begun earlier that
   * run into the span are not lost: with it, cutting a span into chunks gives
   * exactly the transactions of the whole.
   */
  lookbackMs: number;
  /** Seeds a window's draw: the same window of the same stream always draws the same. */
  windowSeed(windowStart: number): number;
  /** The id of the `seq`-th transaction created in the window starting at `windowStart`. */
  idFor(windowStart: number, seq: number): string;
  incidentIdFor(windowStart: number, k: number): string;
  /**
   * Absent: natural pace (the history), each member buying at their own rate
   * and rhythm, so the total follows the hours of the day. Set (the live
   * feed): legitimate arrivals at `ratePerSecond` x (1 - fraudRate) around the clock.
   */
  ratePerSecond?: number;
}

interface Pending {
  t: number;
  ord: number;
  tx: SimulatedTransaction;
}

/** A binary min-heap on (time, creation order); the creation order breaks ties, so output order is deterministic. */
class TimeHeap {
  private readonly a: Pending[] = [];

  get size(): number {
    return this.a.length;
  }

  peek(): Pending | undefined {
    return this.a[0];
  }

  private less(x: Pending, y: Pending): boolean {
    return x.t < y.t || (x.t === y.t && x.ord < y.ord);
  }

  push(p: Pending): void {
    const a = this.a;
    let i = a.length;
    a.push(p);
    while (i > 0) {
      const parent = (i - 1) >> 1;
      if (!this.less(p, a[parent])) break;
      a[i] = a[parent];
      i = parent;
    }
    a[i] = p;
  }

  pop(): Pending | undefined {
    const a = this.a;
    const top = a[0];
    const last = a.pop();
    if (a.length === 0 || last === undefined) return top;
    let i = 0;
    for (;;) {
      const l = 2 * i + 1;
      if (l >= a.length) break;
      const c = l + 1 < a.length && this.less(a[l + 1], a[l]) ? l + 1 : l;
      if (!this.less(a[c], last)) break;
      a[i] = a[c];
      i = c;
    }
    a[i] = last;
    return top;
  }
}

const DAY_MS = 86_400_000;
const sec = (t: number) => Math.floor(t / 1000) * 1000;

/** Legitimate drafts of one window, in time order. */
function legitWindow(spec: StreamSpec, rng: Rng, start: number, end: number): Draft[] {
  const pop = spec.population;
  const out: Draft[] = [];
  if (spec.ratePerSecond !== undefined) {
    // Fixed total rate: every arrival becomes a payment, by a member drawn for this hour.
    const meanGapMs = 1000 / (spec.ratePerSecond * (1 - spec.fraudRate));
    for (let t = start + rng.exponential(meanGapMs); t < end; t += rng.exponential(meanGapMs)) {
      for (let tries = 0; tries < 64; tries++) {
        const m = pop.member(pop.tables.live.draw(rng));
        const city = whereabouts(pop.seed, m, t);
        if (city < 0) continue;
        if (!rng.chance(LIVE_RHYTHM_FLOOR + (1 - LIVE_RHYTHM_FLOOR) * m.hourWeights[localHour(city, t)])) continue;
        out.push(legitDraft(rng, pop.dir, m, sec(t), city));
        break;
      }
    }
    return out;
  }
  // Natural pace by thinning (Lewis & Shedler, 1979): candidates arrive at the
  // sum of every member's peak intensity; each is kept with the chosen member's
  // weight for their local hour, which gives every member their own rhythm.
  const meanGapMs = DAY_MS / pop.tables.naturalPeakPerDay;
  for (let t = start + rng.exponential(meanGapMs); t < end; t += rng.exponential(meanGapMs)) {
    const m = pop.member(pop.tables.natural.draw(rng));
    const city = whereabouts(pop.seed, m, t);
    if (city < 0 || !rng.chance(m.hourWeights[localHour(city, t)])) continue;
    out.push(legitDraft(rng, pop.dir, m, sec(t), city));
  }
  return out;
}

function fraudWindow(spec: StreamSpec, rng: Rng, start: number, end: number, legitCount: number): Draft[] {
  if (spec.fraudRate <= 0) return [];
  const pop = spec.population;
  // Fraud transactions make up `fraudRate` of all: f/(1-f) per legitimate one, in incidents of several each.
  const incidents = rng.poisson((legitCount * spec.fraudRate) / (1 - spec.fraudRate) / MEAN_FRAUD_TX_PER_INCIDENT);
  const out: Draft[] = [];
  for (let k = 0; k < incidents; k++) {
    const pattern = PATTERNS[rng.weighted(PATTERN_CUM)];
    const incidentId = spec.incidentIdFor(start, k);
    const ctx: FraudContext = {
      rng,
      dir: pop.dir,
      incidentId,
      pickVictim: () => pop.member(Math.floor(rng.next() * pop.size)),
      whereabouts: (m, t) => whereabouts(pop.seed, m, t),
      newDevice: (m) => {
        for (let salt = 0; ; salt++) {
          const h = hash32(pop.seed, TAG.fraudDevice, start, k, salt);
          const id = `d-${h.toString(16).padStart(8, '0')}${((h >>> 7) & 0xffff).toString(16).padStart(4, '0')}`;
          if (!m.holder.devices.includes(id)) return id;
        }
      },
    };
    out.push(...pattern.generate(ctx, sec(start + rng.next() * (end - start))));
  }
  return out;
}

/**
 * The transactions of a stream in time order. Generation goes window by
 * window; a window's scenarios may run past its end (a takeover session, a
 * night of cash-outs), so its transactions wait in a heap and leave only once
 * no later window can produce anything earlier.
 */
export function* runStream(spec: StreamSpec): Generator<SimulatedTransaction> {
  const heap = new TimeHeap();
  let ord = 0;
  const first = spec.originMs + Math.floor((spec.fromMs - spec.lookbackMs - spec.originMs) / spec.windowMs) * spec.windowMs;
  for (let start = first; start < spec.toMs; start += spec.windowMs) {
    const end = start + spec.windowMs;
    const rng = new Rng(spec.windowSeed(start));
    const legit = legitWindow(spec, rng, start, end);
    const drafts = legit.concat(fraudWindow(spec, rng, start, end, legit.length));
    let seq = 0;
    for (const d of drafts) {
      const tx = finalise(d, spec.idFor(start, seq++), rng, spec);
      if (d.t >= spec.fromMs && d.t < spec.toMs) heap.push({ t: d.t, ord: ord++, tx });
    }
    while (heap.size > 0 && heap.peek()!.t < end) yield heap.pop()!.tx;
  }
  while (heap.size > 0) yield heap.pop()!.tx;
}
