import { CATEGORIES } from './catalogue';
import type { Member } from './cardholders';
import type { Merchant, MerchantDirectory } from './merchants';
import { cashToMinor, usdToMinor } from './money';
import { foreignIp, residentialIp } from './network';
import { CITIES, HOME_COUNTRY } from './places';
import type { Rng } from './prng';
import type { Channel, Draft } from './payload';

const clamp = (x: number, lo: number, hi: number) => Math.min(hi, Math.max(lo, x));

/** An everyday amount at this merchant for this member, in the merchant's minor units. */
export function everydayMinor(rng: Rng, m: Member, merchant: Merchant): number {
  const cat = CATEGORIES[merchant.category];
  if (cat.cash) return cashToMinor(clamp(rng.logNormal(cat.fixedMedianUsd ?? 80, cat.amountSigma), 20, 500), merchant.currency);
  const median = cat.fixedMedianUsd ?? m.holder.habits.typicalAmountUsd * cat.amountFactor;
  return usdToMinor(clamp(rng.logNormal(median, cat.amountSigma), 1, 4000), merchant.currency);
}

/** The channel a card-present payment at this merchant goes through. */
export function presentChannel(rng: Rng, m: Member, merchant: Merchant): Channel {
  if (CATEGORIES[merchant.category].cash) return 'atm';
  return rng.chance(m.holder.habits.contactlessShare) ? 'contactless' : 'pos';
}

/**
 * One legitimate payment by `m` at `t`, who is in `city` (not in transit):
 * mostly their regular shops at home, the local trade when travelling, online
 * from their own devices and network.
 */
export function legitDraft(rng: Rng, dir: MerchantDirectory, m: Member, t: number, city: number): Draft {
  const h = m.holder;
  const atHome = city === h.homeCity;
  const online = rng.chance(atHome ? h.habits.cnpShare : h.habits.cnpShare * 0.6);
  if (online) {
    const fav = h.habits.favouriteOnline;
    const table = atHome ? dir.onlineHome : dir.onlineTravel;
    const merchant = atHome && fav.length > 0 && rng.chance(0.55) ? dir.merchants[rng.pick(fav)] : table.items[rng.weighted(table.cum)];
    const cat = CATEGORIES[merchant.category];
    const channel: Channel = (cat.key === 'airline' || cat.key === 'hotel') && rng.chance(0.15) ? 'moto' : 'ecommerce';
    const deviceId = rng.chance(0.75) ? h.devices[0] : rng.pick(h.devices);
    const abroad = CITIES[city].country !== HOME_COUNTRY;
    const ip = atHome ? (rng.chance(0.85) ? h.homeIp : residentialIp(rng)) : abroad ? foreignIp(rng) : residentialIp(rng);
    const lat = atHome ? m.homeLat : CITIES[city].lat;
    const lon = atHome ? m.homeLon : CITIES[city].lon;
    return { t, member: m, merchant, minor: everydayMinor(rng, m, merchant), channel, deviceId, ip, lat, lon };
  }
  const fav = h.habits.favouriteMerchants;
  const table = atHome ? dir.cityHome[city] : dir.cityTravel[city];
  const merchant = atHome && fav.length > 0 && rng.chance(0.55) ? dir.merchants[rng.pick(fav)] : table.items[rng.weighted(table.cum)];
  return { t, member: m, merchant, minor: everydayMinor(rng, m, merchant), channel: presentChannel(rng, m, merchant), lat: merchant.lat, lon: merchant.lon };
}
