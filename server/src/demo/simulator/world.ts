import { ISSUER, buildMember, populationTables, type Cardholder, type DemoCard, type Member, type PopulationTables } from './cardholders';
import { buildMerchants, type Merchant } from './merchants';
import { CITIES, type City } from './places';
import { hash32, hashString } from './prng';
import { runStream, type Population, type StreamSpec } from './stream';
import type { SimulatedTransaction } from './payload';
import { TAG } from './tags';

/** The seed the demo uses everywhere (history at first start and the live feed), so both see the same cardholders. */
export const DEMO_SEED = 20_261_130;

export interface DemoWorldOptions {
  /** Integer or string; the same seed always gives the same world and traffic. */
  seed: number | string;
  /** Number of cardholders (one card each). Default 3,000. */
  cardholders?: number;
  /** Number of merchants, at least 180. Default 300. */
  merchants?: number;
}

export interface HistoryOptions {
  from: Date;
  /** Exclusive. */
  to: Date;
  /** Share of transactions that are fraud, 0 to 0.2. Default 0.01. */
  fraudRate?: number;
  /** Share of legitimate transactions a shop would ever label, 0 to 1. Default 0.3. */
  legitLabelShare?: number;
}

export interface LiveOptions {
  startAt: Date;
  /** Share of transactions that are fraud, 0 to 0.2. Default 0.01. */
  fraudRate?: number;
  /**
   * Absent: the world's own pace (its cardholders at their own rates and
   * rhythms, a few thousand transactions a day). Set: about this many
   * transactions per second around the clock; the population then grows
   * (cardholders beyond the world's own, derived the same way; at most
   * 400,000) so that each card still pays about as often as a real one does.
   */
  ratePerSecond?: number;
  legitLabelShare?: number;
}

/** The invented issuer, its cardholders and merchants, and their traffic. */
export interface DemoWorld {
  readonly seed: number;
  readonly issuer: typeof ISSUER;
  readonly cities: readonly City[];
  readonly merchants: readonly Merchant[];
  readonly cardholders: readonly Cardholder[];
  /** One card per cardholder, same order. Holds full card numbers: see DemoCard. */
  readonly cards: readonly DemoCard[];
  /**
   * The transactions with `from <= occurredAt < to` in time order, generated
   * lazily (iterate it; nothing is held). Ids `fh-<yyyymmddhh>-<n>` are fixed
   * by seed and hour, so any cutting of a span into chunks yields the same
   * transactions as the whole span.
   */
  history(options: HistoryOptions): Iterable<SimulatedTransaction>;
  /**
   * An endless stream from `startAt` in time order, at a realistic pace (see
   * `ratePerSecond`). Ids `fl-<startAt in base 36>-<n>`: never those of the
   * history, and a stream started at another instant never repeats them.
   */
  live(options: LiveOptions): IterableIterator<SimulatedTransaction>;
}

const HOUR_MS = 3_600_000;
const DAY_MS = 86_400_000;
const LIVE_WINDOW_MS = 60_000;
/** Longer than any scenario lasts (the slowest spreads its purchases over two days). */
const SCENARIO_LOOKBACK_MS = 3 * DAY_MS;
const EXTRA_MEMBER_CACHE = 50_000;
/** Above this the live population stops growing (its draw tables stay a few megabytes) and cards pay more often instead. */
const MAX_LIVE_POPULATION = 400_000;

function checkRate(name: string, x: number, hi: number): number {
  if (!Number.isFinite(x) || x < 0 || x > hi) throw new RangeError(`${name} must be between 0 and ${hi}`);
  return x;
}

/** `yyyymmddhh` of a UTC hour; ids are made by the hundred thousand per window, so the last key is kept. */
function hourKeys(): (ms: number) => string {
  let lastMs = Number.NaN;
  let last = '';
  return (ms) => {
    if (ms !== lastMs) {
      lastMs = ms;
      last = new Date(ms).toISOString().slice(0, 13).replace(/[-T]/g, '');
    }
    return last;
  };
}

/**
 * Creates the demo world for a seed: merchants, cardholders and their cards.
 * Pure and deterministic; nothing is read or written outside.
 * @throws RangeError on a cardholder count below 1 or a merchant count below 180.
 */
export function createDemoWorld(options: DemoWorldOptions): DemoWorld {
  const seed = typeof options.seed === 'string' ? hashString(options.seed) : options.seed >>> 0;
  const holderCount = options.cardholders ?? 3000;
  if (!Number.isInteger(holderCount) || holderCount < 1) throw new RangeError('a demo world needs at least one cardholder');
  const dir = buildMerchants(seed, options.merchants ?? 300);
  const members: Member[] = Array.from({ length: holderCount }, (_, i) => buildMember(seed, i, dir));
  const tables = new Map<number, PopulationTables>();
  const extra = new Map<number, Member>();

  const population = (size: number): Population => {
    let t = tables.get(size);
    if (!t) {
      t = populationTables(seed, size);
      tables.set(size, t);
    }
    return {
      seed,
      dir,
      size,
      tables: t,
      member(i) {
        if (i < holderCount) return members[i];
        let m = extra.get(i);
        if (!m) {
          if (extra.size >= EXTRA_MEMBER_CACHE) extra.clear();
          m = buildMember(seed, i, dir);
          extra.set(i, m);
        }
        return m;
      },
    };
  };

  return {
    seed,
    issuer: ISSUER,
    cities: CITIES,
    merchants: dir.merchants,
    cardholders: Object.freeze(members.map((m) => m.holder)),
    cards: Object.freeze(members.map((m) => m.card)),

    history(o) {
      const fromMs = o.from.getTime();
      const toMs = o.to.getTime();
      if (!(fromMs <= toMs)) throw new RangeError('history needs from <= to');
      const hourKey = hourKeys();
      const spec: StreamSpec = {
        population: population(holderCount),
        fraudRate: checkRate('fraudRate', o.fraudRate ?? 0.01, 0.2),
        legitLabelShare: checkRate('legitLabelShare', o.legitLabelShare ?? 0.3, 1),
        fromMs,
        toMs,
        originMs: 0,
        windowMs: HOUR_MS,
        lookbackMs: SCENARIO_LOOKBACK_MS,
        windowSeed: (start) => hash32(seed, TAG.history, start / 1000),
        idFor: (start, seq) => `fh-${hourKey(start)}-${String(seq).padStart(4, '0')}`,
        incidentIdFor: (start, k) => `inc-h${hourKey(start)}-${k}`,
      };
      return { [Symbol.iterator]: () => runStream(spec) };
    },

    live(o) {
      const originMs = Math.floor(o.startAt.getTime() / 1000) * 1000;
      if (!Number.isFinite(originMs)) throw new RangeError('live needs a valid startAt');
      const rate = o.ratePerSecond;
      if (rate !== undefined && !(rate > 0 && rate <= 1000)) throw new RangeError('ratePerSecond must be above 0 and at most 1000');
      const base = population(holderCount);
      // Enough cardholders that the rate asked for is their ordinary daily spending.
      const size = rate === undefined ? holderCount : Math.max(holderCount, Math.min(MAX_LIVE_POPULATION, Math.ceil((rate * 86_400) / base.tables.meanTxPerDay)));
      const stamp = (originMs / 1000).toString(36);
      let n = 0;
      return runStream({
        population: size === holderCount ? base : population(size),
        fraudRate: checkRate('fraudRate', o.fraudRate ?? 0.01, 0.2),
        legitLabelShare: checkRate('legitLabelShare', o.legitLabelShare ?? 0.3, 1),
        fromMs: originMs,
        toMs: Number.POSITIVE_INFINITY,
        originMs,
        windowMs: LIVE_WINDOW_MS,
        lookbackMs: 0,
        ratePerSecond: rate,
        windowSeed: (start) => hash32(seed, TAG.live, originMs / 1000, (start - originMs) / 1000),
        idFor: () => `fl-${stamp}-${n++}`,
        incidentIdFor: (start, k) => `inc-l${stamp}-${(start - originMs) / LIVE_WINDOW_MS}-${k}`,
      });
    },
  };
}
