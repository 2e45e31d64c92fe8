import { luhnCheckDigit } from '@shared/card/luhn';
import { FAMILY_NAMES, GIVEN_NAMES } from './catalogue';
import type { MerchantDirectory } from './merchants';
import { residentialIp } from './network';
import { CITIES, cityDistanceKm, utcOffsetMinutes } from './places';
import { AliasTable, Rng, cumulative, hash32 } from './prng';
import { TAG } from './tags';

/** The invented issuer. Its BIN starts with 9: ISO/IEC 7812-1 major industry identifier 9 is for national use, so no card brand owns it. */
export const ISSUER = Object.freeze({ name: 'Fernhollow Credit Union', bin: '990417', country: 'US' as const });

export type Rhythm = 'daytime' | 'commuter' | 'evening' | 'night_owl';

/** Relative spending intensity by local hour 0-23 (peak 1). */
const RHYTHMS: Readonly<Record<Rhythm, readonly number[]>> = Object.freeze({
  daytime: [0.03, 0.015, 0.01, 0.01, 0.01, 0.02, 0.06, 0.18, 0.38, 0.55, 0.7, 0.85, 1, 0.92, 0.78, 0.72, 0.76, 0.85, 0.88, 0.72, 0.52, 0.32, 0.14, 0.06],
  commuter: [0.03, 0.015, 0.01, 0.01, 0.015, 0.05, 0.35, 0.85, 0.75, 0.4, 0.4, 0.6, 1, 0.7, 0.4, 0.4, 0.6, 0.95, 0.9, 0.6, 0.4, 0.25, 0.1, 0.05],
  evening: [0.06, 0.03, 0.015, 0.01, 0.01, 0.01, 0.03, 0.08, 0.15, 0.25, 0.35, 0.5, 0.65, 0.55, 0.45, 0.5, 0.6, 0.8, 0.95, 1, 0.9, 0.7, 0.4, 0.15],
  night_owl: [0.45, 0.3, 0.18, 0.1, 0.06, 0.03, 0.02, 0.03, 0.06, 0.12, 0.25, 0.4, 0.55, 0.6, 0.6, 0.6, 0.65, 0.75, 0.85, 0.95, 1, 0.95, 0.85, 0.65],
});
const RHYTHM_NAMES: readonly Rhythm[] = ['daytime', 'commuter', 'evening', 'night_owl'];
const RHYTHM_CUM = cumulative([0.45, 0.25, 0.22, 0.08]);
const meanOf = (xs: readonly number[]) => xs.reduce((a, b) => a + b, 0) / xs.length;
const RHYTHM_MEAN: Readonly<Record<Rhythm, number>> = Object.freeze(
  Object.fromEntries(RHYTHM_NAMES.map((r) => [r, meanOf(RHYTHMS[r])])) as Record<Rhythm, number>,
);

/**
 * In the live feed a fixed total rate must hold at every hour of the day, so
 * cardholders are drawn with a flattened rhythm: never below a quarter of
 * their peak. Otherwise a demo watched at a quiet hour would show the
 * traffic of the busiest members only.
 */
export const LIVE_RHYTHM_FLOOR = 0.25;

/** A cardholder's spending habits. */
export interface Habits {
  /** Median everyday amount in US dollars. */
  readonly typicalAmountUsd: number;
  /** Expected transactions per day. */
  readonly txPerDay: number;
  readonly rhythm: Rhythm;
  /** Share of transactions made online. */
  readonly cnpShare: number;
  /** Share of in-store payments that are contactless. */
  readonly contactlessShare: number;
  /** Chance of a trip in any 30-day period. */
  readonly travelPropensity: number;
  /** Card-present merchants in the home city they return to (merchant indices). */
  readonly favouriteMerchants: readonly number[];
  /** Online merchants they return to (merchant indices). */
  readonly favouriteOnline: readonly number[];
}

/** One invented cardholder (member of the issuer). */
export interface Cardholder {
  readonly index: number;
  /** `ch-<n>`. */
  readonly id: string;
  readonly name: string;
  /** Index into `CITIES`. */
  readonly homeCity: number;
  readonly habits: Habits;
  /** Device ids of their own phones and computers. */
  readonly devices: readonly string[];
  /** Their home network's address (documentation range). */
  readonly homeIp: string;
}

/**
 * A card of the demo issuer. `number` is the full PAN: it may leave the
 * simulator only inside an ingest payload's `card.number`, and is never to
 * be logged or stored readably.
 */
export interface DemoCard {
  readonly cardholderId: string;
  readonly number: string;
  readonly bin: string;
  readonly last4: string;
}

export interface Trip {
  readonly dest: number;
  readonly departMs: number;
  readonly arriveMs: number;
  readonly backDepartMs: number;
  readonly backArriveMs: number;
}

/** A cardholder with what the generators need: card, rhythm weights and a one-block trip cache. */
export interface Member {
  readonly holder: Cardholder;
  readonly card: DemoCard;
  /** The frozen `card` object shared by every ingest payload of this card. */
  readonly cardRef: Readonly<{ number: string; cardholderId: string }>;
  readonly hourWeights: readonly number[];
  /** Offsets from the home city centre where their online shopping geolocates. */
  readonly homeLat: number;
  readonly homeLon: number;
  tripBlock: number;
  trip: Trip | null;
}

/** Lower and upper clamps keep draws from the long tails out of the absurd. */
const clamp = (x: number, lo: number, hi: number) => Math.min(hi, Math.max(lo, x));

/** Activity and rhythm alone, cheap enough to compute for a large population's draw tables. */
export function memberBasics(seed: number, index: number): { txPerDay: number; rhythm: Rhythm } {
  const rng = new Rng(hash32(seed, TAG.basics, index));
  const txPerDay = clamp(rng.logNormal(1.8, 0.55), 0.3, 8);
  const rhythm = RHYTHM_NAMES[rng.weighted(RHYTHM_CUM)];
  return { txPerDay, rhythm };
}

/**
 * Draw tables over a population of `size` members: `natural` in proportion
 * to each member's peak intensity (thinned later by the hour weight, so each
 * member gets its own daily rhythm), `live` the same for the flattened rhythm.
 */
export interface PopulationTables {
  readonly natural: AliasTable;
  /** Sum of the members' peak intensities, per day: the candidate rate of the natural pace. */
  readonly naturalPeakPerDay: number;
  readonly live: AliasTable;
  readonly meanTxPerDay: number;
}

export function populationTables(seed: number, size: number): PopulationTables {
  const natural = new Float64Array(size);
  const live = new Float64Array(size);
  let total = 0;
  let peak = 0;
  for (let i = 0; i < size; i++) {
    const b = memberBasics(seed, i);
    natural[i] = b.txPerDay / RHYTHM_MEAN[b.rhythm];
    live[i] = b.txPerDay / (LIVE_RHYTHM_FLOOR + (1 - LIVE_RHYTHM_FLOOR) * RHYTHM_MEAN[b.rhythm]);
    total += b.txPerDay;
    peak += natural[i];
  }
  return { natural: new AliasTable(natural), naturalPeakPerDay: peak, live: new AliasTable(live), meanTxPerDay: total / size };
}

/** A bijection on 0..10^9-1 (the multiplier is coprime with 10^9), so account numbers look scattered yet never repeat. */
const accountNumber = (index: number) => (index * 738_219_573 + 104_729_003) % 1_000_000_000;

function deviceId(seed: number, index: number, k: number): string {
  return `d-${hash32(seed, TAG.device, index, k).toString(16).padStart(8, '0')}${(hash32(seed, TAG.device, k, index) & 0xffff).toString(16).padStart(4, '0')}`;
}

const HOME_CUM = cumulative(CITIES.map((c) => c.homeWeight));

/** Distinct draws from a weighted list (gives up after a few tries, so short lists just give fewer). */
function distinctDraws(rng: Rng, items: readonly { index: number }[], cum: Float64Array, n: number): number[] {
  const out = new Set<number>();
  for (let tries = 0; out.size < n && tries < n * 6 && items.length > 0; tries++) out.add(items[rng.weighted(cum)].index);
  return [...out];
}

/** Builds member `index` of the world; the same seed and index always give the same person and card. */
/**
 * The name of cardholder `index` without building the whole member: the same
 * first draws as buildMember, so the issuer's directory (contact records) can
 * name any cardholder the live feed adds.
 */
export function cardholderName(seed: number, index: number): string {
  const rng = new Rng(hash32(seed, TAG.member, index));
  rng.weighted(HOME_CUM);
  return `${rng.pick(GIVEN_NAMES)} ${rng.pick(FAMILY_NAMES)}`;
}

export function buildMember(seed: number, index: number, dir: MerchantDirectory): Member {
  const { txPerDay, rhythm } = memberBasics(seed, index);
  const rng = new Rng(hash32(seed, TAG.member, index));
  const id = `ch-${index + 1}`;
  const homeCity = rng.weighted(HOME_CUM);
  const name = `${rng.pick(GIVEN_NAMES)} ${rng.pick(FAMILY_NAMES)}`;
  const home = dir.cityHome[homeCity];
  const habits: Habits = Object.freeze({
    typicalAmountUsd: Math.round(clamp(rng.logNormal(32, 0.5), 6, 250) * 100) / 100,
    txPerDay,
    rhythm,
    cnpShare: clamp(0.25 + 0.1 * rng.normal(), 0.05, 0.6),
    contactlessShare: rng.range(0.2, 0.75),
    travelPropensity: rng.range(0.1, 0.55),
    favouriteMerchants: Object.freeze(distinctDraws(rng, home.items, home.cum, rng.int(4, 8))),
    favouriteOnline: Object.freeze(distinctDraws(rng, dir.onlineHome.items, dir.onlineHome.cum, rng.int(2, 5))),
  });
  const devices = Object.freeze(Array.from({ length: rng.int(1, 3) }, (_, k) => deviceId(seed, index, k)));
  const holder: Cardholder = Object.freeze({ index, id, name, homeCity, habits, devices, homeIp: residentialIp(rng) });
  const payload = `${ISSUER.bin}${String(accountNumber(index)).padStart(9, '0')}`;
  const number = payload + luhnCheckDigit(payload);
  const card: DemoCard = Object.freeze({ cardholderId: id, number, bin: ISSUER.bin, last4: number.slice(-4) });
  return {
    holder,
    card,
    cardRef: Object.freeze({ number, cardholderId: id }),
    hourWeights: RHYTHMS[rhythm],
    homeLat: Math.round((CITIES[homeCity].lat + rng.range(-0.06, 0.06)) * 1e4) / 1e4,
    homeLon: Math.round((CITIES[homeCity].lon + rng.range(-0.08, 0.08)) * 1e4) / 1e4,
    tripBlock: Number.NaN,
    trip: null,
  };
}

const DAY_MS = 86_400_000;
const HOUR_MS = 3_600_000;
/** Trips are planned per 30-day block and fit inside it, so any instant's whereabouts follow from its block alone. */
export const TRIP_BLOCK_MS = 30 * DAY_MS;

/**
 * Door-to-door hours: driving below 450 km (80 km/h and a quarter hour),
 * flying above it (two and a half hours of airports and 800 km/h). Both stay
 * well under the speeds that would read as impossible travel.
 */
export function travelHours(km: number): number {
  return km < 450 ? km / 80 + 0.25 : 2.5 + km / 800;
}

/** Local wall-clock `hour` on `dayMs` (a UTC midnight) in the city, as epoch milliseconds. */
function atLocalHour(city: number, dayMs: number, hour: number): number {
  const approx = dayMs + hour * HOUR_MS;
  return Math.floor((approx - utcOffsetMinutes(city, approx) * 60_000) / 1000) * 1000;
}

function planTrip(seed: number, m: Member, block: number): Trip | null {
  const { holder } = m;
  const rng = new Rng(hash32(seed, TAG.trip, holder.index, block));
  if (!rng.chance(holder.habits.travelPropensity)) return null;
  const abroad = rng.chance(0.12);
  const weights = CITIES.map((c) =>
    c.index === holder.homeCity || (c.country === 'US') === abroad ? 0 : c.travelWeight,
  );
  const dest = rng.weighted(cumulative(weights));
  const days = rng.int(1, 6);
  const startDay = rng.int(1, 30 - days - 3);
  const blockStart = block * TRIP_BLOCK_MS;
  const hours = travelHours(cityDistanceKm(holder.homeCity, dest)) * HOUR_MS;
  const departMs = atLocalHour(holder.homeCity, blockStart + startDay * DAY_MS, rng.range(6, 20));
  const arriveMs = departMs + Math.round(hours / 1000) * 1000;
  let backDepartMs = atLocalHour(dest, blockStart + (startDay + days) * DAY_MS, rng.range(8, 20));
  if (backDepartMs < arriveMs + 6 * HOUR_MS) backDepartMs = arriveMs + 6 * HOUR_MS;
  return { dest, departMs, arriveMs, backDepartMs, backArriveMs: backDepartMs + Math.round(hours / 1000) * 1000 };
}

/** Where the member is at `ms`: a city index, or -1 while on the road or in the air. */
export function whereabouts(seed: number, m: Member, ms: number): number {
  const block = Math.floor(ms / TRIP_BLOCK_MS);
  if (m.tripBlock !== block) {
    m.tripBlock = block;
    m.trip = planTrip(seed, m, block);
  }
  const t = m.trip;
  if (!t || ms < t.departMs || ms >= t.backArriveMs) return m.holder.homeCity;
  if (ms < t.arriveMs || ms >= t.backDepartMs) return -1;
  return t.dest;
}
