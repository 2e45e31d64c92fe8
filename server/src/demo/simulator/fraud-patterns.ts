import { CATEGORIES, type CategoryKey } from './catalogue';
import type { Member } from './cardholders';
import { everydayMinor, presentChannel } from './legit';
import type { Merchant, MerchantDirectory } from './merchants';
import { cashToMinor, usdToMinor } from './money';
import { foreignIp, proxyIp, residentialIp } from './network';
import { CITIES, HOME_COUNTRY, cityDistanceKm, localMinuteOfDay, nextLocalTime } from './places';
import { cumulative, type Rng } from './prng';
import type { Channel, Draft, FraudPattern, FraudType } from './payload';

/** What a scenario may use: the draw, the merchants, the population and the world's clocks. */
export interface FraudContext {
  readonly rng: Rng;
  readonly dir: MerchantDirectory;
  readonly incidentId: string;
  /** A random member (victims are drawn evenly, not by how much they spend). */
  pickVictim(): Member;
  /** City index where the member is at `t`, or -1 in transit. */
  whereabouts(m: Member, t: number): number;
  /** A device id this member has never used. */
  newDevice(m: Member): string;
}

export interface PatternSpec {
  readonly pattern: FraudPattern;
  /** Share of fraud incidents that are this scenario. */
  readonly weight: number;
  /** Expected fraudulent transactions per incident (from the ranges below), to turn a fraud rate into an incident rate. */
  readonly meanFraudTx: number;
  /** The incident's transactions, none before `t0`; empty when no victim fits. */
  generate(ctx: FraudContext, t0: number): Draft[];
}

const MINUTE = 60_000;
const sec = (t: number) => Math.floor(t / 1000) * 1000;
const mean = (lo: number, hi: number) => (lo + hi) / 2;

const foreignCities = CITIES.filter((c) => c.country !== HOME_COUNTRY);

/** A city abroad (not in `exclude`), weighted by how much traffic it draws. */
function cityAbroad(rng: Rng, exclude?: string): number {
  const options = foreignCities.filter((c) => c.country !== exclude && c.country !== 'CA');
  return options[rng.weighted(cumulative(options.map((c) => c.travelWeight)))].index;
}

/** A city at least `minKm` from `from`, domestic when possible and `domestic` is asked for. */
function farCity(rng: Rng, from: number, minKm: number, domestic: boolean): number {
  const far = CITIES.filter((c) => cityDistanceKm(from, c.index) >= minKm);
  const preferred = far.filter((c) => (c.country === HOME_COUNTRY) === domestic);
  const list = preferred.length > 0 ? preferred : far;
  return list[rng.weighted(cumulative(list.map((c) => c.travelWeight + 0.2)))].index;
}

function draft(
  ctx: FraudContext,
  fraudType: FraudType,
  pattern: FraudPattern,
  t: number,
  member: Member,
  merchant: Merchant,
  minor: number,
  channel: Channel,
  where: { lat: number; lon: number; deviceId?: string; ip?: string },
  extra: Partial<Draft> = {},
): Draft {
  return { t: sec(t), member, merchant, minor, channel, ...where, fraudType, pattern, incidentId: ctx.incidentId, ...extra };
}

const at = (city: number) => ({ lat: CITIES[city].lat, lon: CITIES[city].lon });
const clampUsd = (x: number, lo: number, hi: number) => Math.min(hi, Math.max(lo, x));
/** A log-normal dollar amount held inside [lo, hi]. */
const dollars = (rng: Rng, [median, sigma, lo, hi]: readonly [number, number, number, number]) => clampUsd(rng.logNormal(median, sigma), lo, hi);

/** `n` payments from `t0`, each a draw of `gapMinutes` after the one before. */
function series(rng: Rng, n: number, t0: number, gapMinutes: readonly [number, number], make: (t: number) => Draft): Draft[] {
  const out: Draft[] = [];
  let t = t0;
  for (let k = 0; k < n; k++) {
    out.push(make(t));
    t += rng.range(gapMinutes[0], gapMinutes[1]) * MINUTE;
  }
  return out;
}

/** A payment in person by whoever holds the card: banknotes from a cash machine, goods priced by `goods` elsewhere. */
function inPerson(
  ctx: FraudContext,
  kind: { fraudType: FraudType; pattern: FraudPattern },
  t: number,
  victim: Member,
  merchant: Merchant,
  cashUsd: readonly [number, number],
  goods: readonly [number, number, number, number],
): Draft {
  const cash = CATEGORIES[merchant.category].cash;
  const minor = cash ? cashToMinor(ctx.rng.range(cashUsd[0], cashUsd[1]), merchant.currency) : usdToMinor(dollars(ctx.rng, goods), merchant.currency);
  return draft(ctx, kind.fraudType, kind.pattern, t, victim, merchant, minor, cash ? 'atm' : 'pos', { lat: merchant.lat, lon: merchant.lon });
}

const homeCities = CITIES.filter((c) => c.country === HOME_COUNTRY);

/** A victim and the city they are in at `t` (their home city while on the road). */
function victimInTown(ctx: FraudContext, t: number): { victim: Member; city: number } {
  const victim = ctx.pickVictim();
  const here = ctx.whereabouts(victim, t);
  return { victim, city: here >= 0 ? here : victim.holder.homeCity };
}

const TESTING_MIN = 5;
const TESTING_MAX = 30;
const TESTING_BIG_CHANCE = 0.4;
const TESTING_MERCHANTS: CategoryKey[] = ['digital_games', 'digital_media', 'digital_apps'];
const CASH_OUT_ONLINE: CategoryKey[] = ['online_electronics', 'online_jewellery', 'online_money_transfer', 'marketplace'];

/**
 * Card testing: a bot checks a stolen number with a burst of tiny online
 * payments at digital-goods merchants, seconds apart, from one unknown device;
 * sometimes one large purchase follows once the number is known to work.
 */
const cardTesting: PatternSpec = {
  pattern: 'card_testing',
  weight: 0.08,
  meanFraudTx: mean(TESTING_MIN, TESTING_MAX) + TESTING_BIG_CHANCE,
  generate(ctx, t0) {
    const { rng } = ctx;
    const victim = ctx.pickVictim();
    const sites = ctx.dir.online(TESTING_MERCHANTS, HOME_COUNTRY);
    const site = [rng.pick(sites), rng.pick(sites), rng.pick(sites)].slice(0, rng.int(1, 3));
    const deviceId = ctx.newDevice(victim);
    const abroad = rng.chance(0.5);
    const ip = abroad ? foreignIp(rng) : proxyIp(rng);
    const where = { ...at(abroad ? cityAbroad(rng) : rng.pick(homeCities).index), deviceId, ip };
    const n = rng.int(TESTING_MIN, TESTING_MAX);
    // Seconds apart: 3 to 30 s, so even thirty probes fit in a quarter of an hour.
    const out = series(rng, n, t0, [3 / 60, 30 / 60], (t) => {
      const merchant = rng.pick(site);
      const minor = usdToMinor(Math.round(rng.range(0.5, 2.0) * 100) / 100, merchant.currency);
      return draft(ctx, 'card_not_present', 'card_testing', t, victim, merchant, minor, 'ecommerce', where, { reportChance: 0.6 });
    });
    if (rng.chance(TESTING_BIG_CHANCE)) {
      const merchant = rng.pick(ctx.dir.online(['online_electronics', 'digital_games', 'marketplace']));
      const minor = usdToMinor(dollars(rng, [450, 0.5, 150, 1500]), merchant.currency);
      out.push(draft(ctx, 'card_not_present', 'card_testing', out[out.length - 1].t + rng.range(2, 30) * MINUTE, victim, merchant, minor, 'ecommerce', where));
    }
    return out;
  },
};

const ATO_SPENDS_MIN = 1;
const ATO_SPENDS_MAX = 4;
const ATO_PROBE_CHANCE = 0.5;

/**
 * Account takeover: someone resets the member's online-banking or wallet
 * credentials from abroad; within minutes a never-seen device on a foreign
 * network spends large sums on goods and transfers that turn into cash.
 */
const accountTakeover: PatternSpec = {
  pattern: 'account_takeover',
  weight: 0.14,
  meanFraudTx: ATO_PROBE_CHANCE + mean(ATO_SPENDS_MIN, ATO_SPENDS_MAX),
  generate(ctx, t0) {
    const { rng } = ctx;
    const victim = ctx.pickVictim();
    const where = { ...at(cityAbroad(rng)), deviceId: ctx.newDevice(victim), ip: foreignIp(rng) };
    const out: Draft[] = [];
    let t = t0 + rng.range(1, 8) * MINUTE;
    if (rng.chance(ATO_PROBE_CHANCE)) {
      const merchant = rng.pick(ctx.dir.online(['digital_media', 'digital_apps', 'streaming']));
      out.push(draft(ctx, 'account_takeover', 'account_takeover', t, victim, merchant, usdToMinor(rng.range(1, 15), merchant.currency), 'ecommerce', where));
      t += rng.range(2, 12) * MINUTE;
    }
    const spends = series(rng, rng.int(ATO_SPENDS_MIN, ATO_SPENDS_MAX), t, [1, 10], (when) => {
      const merchant = rng.pick(ctx.dir.online(CASH_OUT_ONLINE, HOME_COUNTRY));
      return draft(ctx, 'account_takeover', 'account_takeover', when, victim, merchant, usdToMinor(dollars(rng, [900, 0.5, 300, 4000]), merchant.currency), 'ecommerce', where);
    });
    return out.concat(spends);
  },
};

const TRAVEL_FRAUD_MAX = 3;
/** Far enough that covering it in under an hour would take over 2,500 km/h. */
const IMPOSSIBLE_KM = 2500;
const IMPOSSIBLE: { fraudType: FraudType; pattern: FraudPattern } = { fraudType: 'counterfeit', pattern: 'impossible_travel' };

/**
 * Impossible travel: the member pays in a shop where they are; under an hour
 * later a cloned card is used in person thousands of kilometres away.
 */
const impossibleTravel: PatternSpec = {
  pattern: 'impossible_travel',
  weight: 0.13,
  meanFraudTx: mean(1, TRAVEL_FRAUD_MAX),
  generate(ctx, t0) {
    const { rng } = ctx;
    for (let tries = 0; tries < 8; tries++) {
      const victim = ctx.pickVictim();
      const here = ctx.whereabouts(victim, t0);
      if (here < 0) continue;
      const local = ctx.dir.cityHome[here];
      const shop = local.items[rng.weighted(local.cum)];
      // The member's own payment: legitimate, part of the scenario only as its anchor.
      const anchor: Draft = { t: sec(t0), member: victim, merchant: shop, minor: everydayMinor(rng, victim, shop), channel: presentChannel(rng, victim, shop), lat: shop.lat, lon: shop.lon, incidentId: ctx.incidentId };
      const shops = ctx.dir.inCity(farCity(rng, here, IMPOSSIBLE_KM, rng.chance(0.6)), ['electronics', 'jewellery', 'department', 'atm']);
      const start = t0 + rng.range(10, 55) * MINUTE;
      const cloned = series(rng, rng.int(1, TRAVEL_FRAUD_MAX), start, [3, 20], (t) => inPerson(ctx, IMPOSSIBLE, t, victim, rng.pick(shops), [200, 500], [600, 0.5, 120, 3000]));
      return [anchor, ...cloned];
    }
    return [];
  },
};

const ODD_MIN = 1;
const ODD_MAX = 4;
const ODD_START_MIN = 2 * 60;
const HIGH_RISK_ONLINE: CategoryKey[] = ['online_money_transfer', 'online_gambling', 'online_quasi_cash'];
const HIGH_RISK_PRESENT: CategoryKey[] = ['atm', 'quasi_cash', 'casino', 'money_transfer'];
const ODD_PRESENT: { fraudType: FraudType; pattern: FraudPattern } = { fraudType: 'lost_stolen', pattern: 'odd_hour_high_risk' };

/**
 * High-risk categories at odd hours: between 02:00 and 05:00 where the member
 * lives, a stolen card or its details are turned into cash: money transfers,
 * gambling and quasi-cash online, or cash machines and money-order counters
 * in town with the lost card itself.
 */
const oddHourHighRisk: PatternSpec = {
  pattern: 'odd_hour_high_risk',
  weight: 0.15,
  meanFraudTx: mean(ODD_MIN, ODD_MAX),
  generate(ctx, t0) {
    const { rng } = ctx;
    const { victim, city } = victimInTown(ctx, t0);
    // Start between 02:00 and 03:30 local; four payments at most 15 minutes apart end before 04:30.
    const minute = localMinuteOfDay(city, t0);
    const start = minute >= ODD_START_MIN && minute < ODD_START_MIN + 90 ? t0 : nextLocalTime(city, t0, ODD_START_MIN) + rng.range(0, 89) * MINUTE;
    const present = rng.chance(0.4);
    const online = { lat: victim.homeLat, lon: victim.homeLon, deviceId: ctx.newDevice(victim), ip: proxyIp(rng) };
    const where = city === victim.holder.homeCity ? online : { ...online, ...at(city) };
    return series(rng, rng.int(ODD_MIN, ODD_MAX), start, [3, 15], (t) => {
      if (present) return inPerson(ctx, ODD_PRESENT, t, victim, rng.pick(ctx.dir.inCity(city, HIGH_RISK_PRESENT)), [200, 500], [500, 0.5, 150, 1500]);
      const merchant = rng.pick(ctx.dir.online(HIGH_RISK_ONLINE, HOME_COUNTRY));
      return draft(ctx, 'card_not_present', 'odd_hour_high_risk', t, victim, merchant, usdToMinor(dollars(rng, [500, 0.5, 150, 1500]), merchant.currency), 'ecommerce', where);
    });
  },
};

const ABROAD_MIN = 1;
const ABROAD_MAX = 5;
const ABROAD: { fraudType: FraudType; pattern: FraudPattern } = { fraudType: 'counterfeit', pattern: 'counterfeit_abroad' };

/** Counterfeit abroad: a card cloned at home is used in person in another country over a few hours. */
const counterfeitAbroad: PatternSpec = {
  pattern: 'counterfeit_abroad',
  weight: 0.12,
  meanFraudTx: mean(ABROAD_MIN, ABROAD_MAX),
  generate(ctx, t0) {
    const { rng } = ctx;
    const { victim, city: here } = victimInTown(ctx, t0);
    const shops = ctx.dir.inCity(cityAbroad(rng, CITIES[here].country), ['electronics', 'jewellery', 'department', 'atm', 'restaurant', 'variety']);
    return series(rng, rng.int(ABROAD_MIN, ABROAD_MAX), t0, [10, 90], (t) => inPerson(ctx, ABROAD, t, victim, rng.pick(shops), [150, 400], [350, 0.7, 40, 2500]));
  },
};

const STOLEN_MIN = 1;
const STOLEN_MAX = 3;

/** Stolen card details (a breached shop, phishing) used online from an unknown device. */
const cnpStolenDetails: PatternSpec = {
  pattern: 'cnp_stolen_details',
  weight: 0.18,
  meanFraudTx: mean(STOLEN_MIN, STOLEN_MAX),
  generate(ctx, t0) {
    const { rng } = ctx;
    const victim = ctx.pickVictim();
    const abroad = rng.chance(0.35);
    const city = abroad ? cityAbroad(rng) : rng.pick(homeCities).index;
    const where = { ...at(city), deviceId: ctx.newDevice(victim), ip: abroad ? foreignIp(rng) : rng.chance(0.5) ? proxyIp(rng) : residentialIp(rng) };
    const sites = ctx.dir.online(['marketplace', 'online_electronics', 'airline', 'online_jewellery', 'digital_games']);
    return series(rng, rng.int(STOLEN_MIN, STOLEN_MAX), t0, [5, 120], (t) => {
      const merchant = rng.pick(sites);
      return draft(ctx, 'card_not_present', 'cnp_stolen_details', t, victim, merchant, usdToMinor(dollars(rng, [260, 0.6, 60, 1800]), merchant.currency), 'ecommerce', where);
    });
  },
};

const SPREE_MIN = 2;
const SPREE_MAX = 6;

/** A lost or stolen card spent in person in the member's own town, shop after shop, before it is reported. */
const lostStolenSpree: PatternSpec = {
  pattern: 'lost_stolen_spree',
  weight: 0.1,
  meanFraudTx: mean(SPREE_MIN, SPREE_MAX),
  generate(ctx, t0) {
    const { rng } = ctx;
    const { victim, city } = victimInTown(ctx, t0);
    const shops = ctx.dir.inCity(city, ['fuel', 'liquor', 'grocery', 'electronics', 'department', 'variety', 'jewellery']);
    return series(rng, rng.int(SPREE_MIN, SPREE_MAX), t0, [4, 25], (t) => {
      const merchant = rng.pick(shops);
      // Mostly taps under the usual no-PIN limit, now and then a larger chip purchase.
      const contactless = rng.chance(0.7);
      const usd = contactless ? rng.range(25, 99) : dollars(rng, [300, 0.6, 60, 2000]);
      return draft(ctx, 'lost_stolen', 'lost_stolen_spree', t, victim, merchant, usdToMinor(usd, merchant.currency), contactless ? 'contactless' : 'pos', { lat: merchant.lat, lon: merchant.lon });
    });
  },
};

/**
 * First-party fraud: the member buys online from home, on their own device,
 * and later disputes the purchase as not theirs. Nothing in the payment looks
 * wrong; only the dispute weeks later tells.
 */
const firstPartyDispute: PatternSpec = {
  pattern: 'first_party_dispute',
  weight: 0.1,
  meanFraudTx: mean(1, 2),
  generate(ctx, t0) {
    const { rng } = ctx;
    let victim = ctx.pickVictim();
    for (let tries = 0; tries < 8 && ctx.whereabouts(victim, t0) !== victim.holder.homeCity; tries++) victim = ctx.pickVictim();
    if (ctx.whereabouts(victim, t0) !== victim.holder.homeCity) return [];
    const h = victim.holder;
    const where = { lat: victim.homeLat, lon: victim.homeLon, deviceId: h.devices[0], ip: h.homeIp };
    return series(rng, rng.int(1, 2), t0, [60, 48 * 60], (t) => {
      const merchant = rng.pick(ctx.dir.online(['online_electronics', 'marketplace', 'online_jewellery'], HOME_COUNTRY));
      const minor = usdToMinor(clampUsd(h.habits.typicalAmountUsd * rng.range(2, 6), 80, 2500), merchant.currency);
      return draft(ctx, 'first_party', 'first_party_dispute', t, victim, merchant, minor, 'ecommerce', where, { reportChance: 0.9, reportMedianDays: 25 });
    });
  },
};

export const PATTERNS: readonly PatternSpec[] = Object.freeze([
  cardTesting,
  accountTakeover,
  impossibleTravel,
  oddHourHighRisk,
  counterfeitAbroad,
  cnpStolenDetails,
  lostStolenSpree,
  firstPartyDispute,
]);

export const PATTERN_CUM = cumulative(PATTERNS.map((p) => p.weight));

/** Expected fraudulent transactions per incident over the scenario mix. */
export const MEAN_FRAUD_TX_PER_INCIDENT = PATTERNS.reduce((s, p) => s + p.weight * p.meanFraudTx, 0) / PATTERNS.reduce((s, p) => s + p.weight, 0);
