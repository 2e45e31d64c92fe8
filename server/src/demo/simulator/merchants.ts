import { CATEGORIES, NAME_WORDS, type Category, type CategoryKey } from './catalogue';
import { currencyOf, type CurrencyCode } from './money';
import { CITIES, type CountryCode } from './places';
import { Rng, cumulative, hash32 } from './prng';
import { TAG } from './tags';

/** One invented merchant. */
export interface Merchant {
  readonly index: number;
  /** `m-<n>`, stable for a seed and merchant count. */
  readonly id: string;
  readonly name: string;
  readonly category: CategoryKey;
  /** ISO 18245 merchant category code. */
  readonly mcc: string;
  /** ISO 3166-1 alpha-2. */
  readonly country: CountryCode;
  /** Index into `CITIES`: the shop's city, or an online merchant's seat. */
  readonly city: number;
  readonly lat: number;
  readonly lon: number;
  readonly cardPresent: boolean;
  /** What it charges in: the currency of its country. */
  readonly currency: CurrencyCode;
  /** The frozen `merchant` object shared by every ingest payload at this merchant. */
  readonly ref: Readonly<{ id: string; name: string; mcc: string; country: string }>;
}

/** Merchants with the cumulative weights of a weighted draw among them. */
export interface WeightedMerchants {
  readonly items: readonly Merchant[];
  readonly cum: Float64Array;
}

/** The merchants, indexed the ways the traffic generators draw them. */
export interface MerchantDirectory {
  readonly merchants: readonly Merchant[];
  /** Per city: card-present merchants weighted for members at home. */
  readonly cityHome: readonly WeightedMerchants[];
  /** Per city: card-present merchants weighted for visitors. */
  readonly cityTravel: readonly WeightedMerchants[];
  readonly onlineHome: WeightedMerchants;
  readonly onlineTravel: WeightedMerchants;
  /** Card-present merchants of some categories in a city; the city's whole list when it has none of them. */
  inCity(city: number, categories: readonly CategoryKey[]): readonly Merchant[];
  /** Online merchants of some categories (all online merchants when there are none). */
  online(categories: readonly CategoryKey[], country?: CountryCode): readonly Merchant[];
}

/** Fewest merchants a world can have: every city needs a few shops and the web a few sites. */
export const MIN_MERCHANTS = 180;

const ONLINE_SHARE = 0.22;
const MIN_PER_CITY = 3;
const GAMBLING_TOWNS = new Set(['Las Vegas']);

const HOME_ORDER: CategoryKey[] = [
  'grocery', 'restaurant', 'fuel', 'atm', 'fast_food', 'pharmacy', 'variety', 'department', 'liquor', 'taxi',
  'electronics', 'hotel', 'grocery', 'restaurant', 'fast_food', 'fuel', 'jewellery', 'quasi_cash', 'money_transfer',
  'casino', 'department', 'variety', 'restaurant', 'grocery', 'pharmacy', 'electronics', 'atm',
];
const HOME_REPEAT: CategoryKey[] = ['grocery', 'restaurant', 'fast_food', 'fuel', 'variety', 'pharmacy', 'department', 'restaurant', 'liquor', 'taxi'];
const TRAVEL_ORDER: CategoryKey[] = [
  'restaurant', 'hotel', 'atm', 'taxi', 'fast_food', 'grocery', 'department', 'electronics', 'jewellery', 'variety',
  'pharmacy', 'restaurant', 'hotel', 'quasi_cash', 'casino', 'money_transfer',
];
const TRAVEL_REPEAT: CategoryKey[] = ['restaurant', 'hotel', 'fast_food', 'taxi', 'department', 'grocery'];
const ONLINE_ORDER: CategoryKey[] = [
  'marketplace', 'digital_games', 'digital_media', 'streaming', 'ride_app', 'digital_apps', 'online_electronics',
  'airline', 'online_money_transfer', 'online_gambling', 'online_quasi_cash', 'online_jewellery', 'marketplace',
  'digital_games', 'digital_media', 'marketplace', 'online_electronics', 'digital_apps',
];
/** Online merchants abroad sit in these cities (indices into CITIES by name). */
const OFFSHORE_SEATS = ['Dublin', 'Amsterdam', 'London'];

function categorySequence(order: CategoryKey[], repeat: CategoryKey[], n: number): CategoryKey[] {
  const out: CategoryKey[] = [];
  for (let i = 0; i < n; i++) out.push(i < order.length ? order[i] : repeat[(i - order.length) % repeat.length]);
  return out;
}

/** Splits `total` into per-city counts: a floor for every city, the rest by where members live and travel. */
function cityQuotas(total: number): number[] {
  const shares = CITIES.map((c) => c.homeWeight + 0.6 * c.travelWeight + 0.5);
  const sum = shares.reduce((a, b) => a + b, 0);
  const rest = total - MIN_PER_CITY * CITIES.length;
  const raw = shares.map((s) => (rest * s) / sum);
  const quotas = raw.map((r) => MIN_PER_CITY + Math.floor(r));
  let missing = total - quotas.reduce((a, b) => a + b, 0);
  const byFraction = raw.map((r, i) => ({ i, f: r - Math.floor(r) })).sort((a, b) => b.f - a.f || a.i - b.i);
  for (let k = 0; missing > 0; k = (k + 1) % byFraction.length, missing--) quotas[byFraction[k].i]++;
  return quotas;
}

function weightedList(items: Merchant[], weightOf: (m: Merchant, rankInCategory: number) => number): WeightedMerchants {
  const rank = new Map<CategoryKey, number>();
  const weights = items.map((m) => {
    const r = rank.get(m.category) ?? 0;
    rank.set(m.category, r + 1);
    return weightOf(m, r);
  });
  return { items, cum: cumulative(weights) };
}

/** Popularity falls off within a category (a Zipf-like 1/(rank+1)^0.7), so some shops are everyone's regulars. */
const popularity = (rank: number) => 1 / (rank + 1) ** 0.7;

/**
 * Builds `count` invented merchants, deterministic for the seed.
 * @throws RangeError when `count` is below MIN_MERCHANTS.
 */
export function buildMerchants(seed: number, count: number): MerchantDirectory {
  if (!Number.isInteger(count) || count < MIN_MERCHANTS) throw new RangeError(`a demo world needs at least ${MIN_MERCHANTS} merchants`);
  const rng = new Rng(hash32(seed, TAG.merchants, count));
  const onlineCount = Math.round(count * ONLINE_SHARE);
  const quotas = cityQuotas(count - onlineCount);
  const usedNames = new Set<string>();
  const merchants: Merchant[] = [];

  const nameFor = (cat: Category): string => {
    for (let attempt = 0; ; attempt++) {
      const name = `${rng.pick(NAME_WORDS)} ${rng.pick(cat.suffixes)}${attempt > 40 ? ` ${attempt}` : ''}`;
      if (!usedNames.has(name)) {
        usedNames.add(name);
        return name;
      }
    }
  };
  const add = (key: CategoryKey, city: number, country: CountryCode) => {
    const cat = CATEGORIES[key];
    const index = merchants.length;
    const id = `m-${index + 1}`;
    const name = nameFor(cat);
    const lat = Math.round((CITIES[city].lat + rng.range(-0.04, 0.04)) * 1e4) / 1e4;
    const lon = Math.round((CITIES[city].lon + rng.range(-0.05, 0.05)) * 1e4) / 1e4;
    const ref = Object.freeze({ id, name, mcc: cat.mcc, country });
    merchants.push(
      Object.freeze({ index, id, name, category: key, mcc: cat.mcc, country, city, lat, lon, cardPresent: cat.cardPresent, currency: currencyOf(country), ref }),
    );
  };

  CITIES.forEach((city, ci) => {
    const home = city.homeWeight > 0;
    let seq = categorySequence(home ? HOME_ORDER : TRAVEL_ORDER, home ? HOME_REPEAT : TRAVEL_REPEAT, quotas[ci]);
    if (GAMBLING_TOWNS.has(city.name)) seq = ['casino', ...seq.slice(0, -1)];
    for (const key of seq) add(key, ci, city.country);
  });
  const usCities = CITIES.filter((c) => c.country === 'US' && c.homeWeight > 0).map((c) => c.index);
  const offshore = OFFSHORE_SEATS.map((n) => CITIES.findIndex((c) => c.name === n));
  for (let i = 0; i < onlineCount; i++) {
    const key = ONLINE_ORDER[i % ONLINE_ORDER.length];
    const abroad = rng.chance(key === 'online_gambling' ? 0.5 : 0.08);
    const city = abroad ? rng.pick(offshore) : rng.pick(usCities);
    add(key, city, CITIES[city].country);
  }

  const cardPresentIn = CITIES.map((c) => merchants.filter((m) => m.cardPresent && m.city === c.index));
  const onlineAll = merchants.filter((m) => !m.cardPresent);
  const cityHome = cardPresentIn.map((list) => weightedList(list, (m, r) => CATEGORIES[m.category].homeWeight * popularity(r) + 1e-3));
  const cityTravel = cardPresentIn.map((list) => weightedList(list, (m, r) => CATEGORIES[m.category].travelWeight * popularity(r) + 1e-3));
  const onlineHome = weightedList(onlineAll, (m, r) => CATEGORIES[m.category].homeWeight * popularity(r));
  const onlineTravel = weightedList(onlineAll, (m, r) => CATEGORIES[m.category].travelWeight * popularity(r));

  const cache = new Map<string, readonly Merchant[]>();
  const memo = (key: string, build: () => Merchant[]) => {
    let hit = cache.get(key);
    if (!hit) {
      hit = Object.freeze(build());
      cache.set(key, hit);
    }
    return hit;
  };

  return {
    merchants: Object.freeze(merchants),
    cityHome,
    cityTravel,
    onlineHome,
    onlineTravel,
    inCity: (city, categories) =>
      memo(`c${city}:${categories.join(',')}`, () => {
        const hits = cardPresentIn[city].filter((m) => categories.includes(m.category));
        return hits.length > 0 ? hits : cardPresentIn[city];
      }),
    online: (categories, country) =>
      memo(`o${country ?? ''}:${categories.join(',')}`, () => {
        const inCats = onlineAll.filter((m) => categories.includes(m.category));
        const inCountry = country ? inCats.filter((m) => m.country === country) : inCats;
        return inCountry.length > 0 ? inCountry : inCats.length > 0 ? inCats : onlineAll;
      }),
  };
}

