/**
 * Where the invented issuer's members live and travel: real places (cities
 * are places, not institutions), with approximate city-centre coordinates and
 * their IANA time zones, so local hours follow the real clock changes.
 *
 * The issuer is regional: most members live in the Front Range and the
 * Mountain West, a third elsewhere in the US, a few just over the border in
 * Canada. The other cities are travel destinations (and where stolen card
 * data gets used).
 */

export type CountryCode = 'US' | 'CA' | 'MX' | 'GB' | 'IE' | 'FR' | 'DE' | 'ES' | 'IT' | 'NL' | 'PT' | 'JP';

export interface City {
  readonly index: number;
  readonly name: string;
  readonly country: CountryCode;
  /** IANA time zone name. */
  readonly zone: string;
  readonly lat: number;
  readonly lon: number;
  /** Relative share of members living here (0: nobody lives here). */
  readonly homeWeight: number;
  /** Relative pull as a travel destination. */
  readonly travelWeight: number;
}

type CityRow = [name: string, country: CountryCode, zone: string, lat: number, lon: number, home: number, travel: number];

const ROWS: CityRow[] = [
  ['Denver', 'US', 'America/Denver', 39.7392, -104.9903, 22, 5],
  ['Boulder', 'US', 'America/Denver', 40.015, -105.2705, 7, 2],
  ['Colorado Springs', 'US', 'America/Denver', 38.8339, -104.8214, 10, 2],
  ['Fort Collins', 'US', 'America/Denver', 40.5853, -105.0844, 6, 1],
  ['Pueblo', 'US', 'America/Denver', 38.2544, -104.6091, 3, 0.5],
  ['Cheyenne', 'US', 'America/Denver', 41.14, -104.8202, 2, 0.5],
  ['Salt Lake City', 'US', 'America/Denver', 40.7608, -111.891, 6, 2],
  ['Albuquerque', 'US', 'America/Denver', 35.0844, -106.6504, 4, 1],
  ['Santa Fe', 'US', 'America/Denver', 35.687, -105.9378, 2, 2],
  ['Boise', 'US', 'America/Boise', 43.615, -116.2023, 3, 1],
  ['New York', 'US', 'America/New_York', 40.7128, -74.006, 4, 8],
  ['Boston', 'US', 'America/New_York', 42.3601, -71.0589, 2, 3],
  ['Washington', 'US', 'America/New_York', 38.9072, -77.0369, 2, 4],
  ['Atlanta', 'US', 'America/New_York', 33.749, -84.388, 2, 2],
  ['Miami', 'US', 'America/New_York', 25.7617, -80.1918, 2, 4],
  ['Chicago', 'US', 'America/Chicago', 41.8781, -87.6298, 3, 5],
  ['Minneapolis', 'US', 'America/Chicago', 44.9778, -93.265, 1.5, 1],
  ['Kansas City', 'US', 'America/Chicago', 39.0997, -94.5786, 1.5, 1],
  ['Nashville', 'US', 'America/Chicago', 36.1627, -86.7816, 1, 2],
  ['Dallas', 'US', 'America/Chicago', 32.7767, -96.797, 2, 2],
  ['Houston', 'US', 'America/Chicago', 29.7604, -95.3698, 2, 2],
  ['Austin', 'US', 'America/Chicago', 30.2672, -97.7431, 1.5, 2],
  ['Phoenix', 'US', 'America/Phoenix', 33.4484, -112.074, 3, 2],
  ['Las Vegas', 'US', 'America/Los_Angeles', 36.1699, -115.1398, 1.5, 6],
  ['Los Angeles', 'US', 'America/Los_Angeles', 34.0522, -118.2437, 2.5, 6],
  ['San Diego', 'US', 'America/Los_Angeles', 32.7157, -117.1611, 1, 3],
  ['San Francisco', 'US', 'America/Los_Angeles', 37.7749, -122.4194, 1.5, 5],
  ['Portland', 'US', 'America/Los_Angeles', 45.5152, -122.6784, 1, 2],
  ['Seattle', 'US', 'America/Los_Angeles', 47.6062, -122.3321, 1.5, 3],
  ['Honolulu', 'US', 'Pacific/Honolulu', 21.3069, -157.8583, 0, 3],
  ['Calgary', 'CA', 'America/Edmonton', 51.0447, -114.0719, 1, 1],
  ['Vancouver', 'CA', 'America/Vancouver', 49.2827, -123.1207, 0.8, 2],
  ['Toronto', 'CA', 'America/Toronto', 43.6532, -79.3832, 0, 2],
  ['Mexico City', 'MX', 'America/Mexico_City', 19.4326, -99.1332, 0, 1.5],
  ['Cancún', 'MX', 'America/Cancun', 21.1619, -86.8515, 0, 3],
  ['London', 'GB', 'Europe/London', 51.5074, -0.1278, 0, 3],
  ['Manchester', 'GB', 'Europe/London', 53.4808, -2.2426, 0, 0.5],
  ['Dublin', 'IE', 'Europe/Dublin', 53.3498, -6.2603, 0, 1],
  ['Paris', 'FR', 'Europe/Paris', 48.8566, 2.3522, 0, 2],
  ['Berlin', 'DE', 'Europe/Berlin', 52.52, 13.405, 0, 1],
  ['Madrid', 'ES', 'Europe/Madrid', 40.4168, -3.7038, 0, 1],
  ['Rome', 'IT', 'Europe/Rome', 41.9028, 12.4964, 0, 1.5],
  ['Amsterdam', 'NL', 'Europe/Amsterdam', 52.3676, 4.9041, 0, 1],
  ['Lisbon', 'PT', 'Europe/Lisbon', 38.7223, -9.1393, 0, 1],
  ['Tokyo', 'JP', 'Asia/Tokyo', 35.6762, 139.6503, 0, 1.5],
];

export const CITIES: readonly City[] = Object.freeze(
  ROWS.map(([name, country, zone, lat, lon, homeWeight, travelWeight], index) =>
    Object.freeze({ index, name, country, zone, lat, lon, homeWeight, travelWeight }),
  ),
);

/** The issuer's home country: a merchant elsewhere is foreign. */
export const HOME_COUNTRY: CountryCode = 'US';

const EARTH_RADIUS_KM = 6371.0088; // IUGG mean Earth radius

/** Great-circle distance in km by the haversine formula (Sinnott, "Virtues of the Haversine", Sky & Telescope 1984). */
export function distanceKm(lat1: number, lon1: number, lat2: number, lon2: number): number {
  const r = Math.PI / 180;
  const dPhi = (lat2 - lat1) * r;
  const dLambda = (lon2 - lon1) * r;
  const h = Math.sin(dPhi / 2) ** 2 + Math.cos(lat1 * r) * Math.cos(lat2 * r) * Math.sin(dLambda / 2) ** 2;
  return 2 * EARTH_RADIUS_KM * Math.asin(Math.min(1, Math.sqrt(h)));
}

export function cityDistanceKm(a: number, b: number): number {
  const ca = CITIES[a];
  const cb = CITIES[b];
  return distanceKm(ca.lat, ca.lon, cb.lat, cb.lon);
}

const HOUR_MS = 3_600_000;
const DAY_MS = 86_400_000;
const formatters = new Map<string, Intl.DateTimeFormat>();
const offsetCache = new Map<number, number>();
const OFFSET_CACHE_LIMIT = 250_000;

function formatter(zone: string): Intl.DateTimeFormat {
  let f = formatters.get(zone);
  if (!f) {
    f = new Intl.DateTimeFormat('en-US', {
      timeZone: zone,
      hourCycle: 'h23',
      year: 'numeric',
      month: 'numeric',
      day: 'numeric',
      hour: 'numeric',
      minute: 'numeric',
    });
    formatters.set(zone, f);
  }
  return f;
}

function computeOffsetMinutes(zone: string, ms: number): number {
  const parts = formatter(zone).formatToParts(new Date(ms));
  const field = (type: Intl.DateTimeFormatPartTypes) => Number(parts.find((p) => p.type === type)?.value ?? 0);
  const wallAsUtc = Date.UTC(field('year'), field('month') - 1, field('day'), field('hour'), field('minute'));
  return Math.round((wallAsUtc - Math.floor(ms / 60_000) * 60_000) / 60_000);
}

/**
 * UTC offset of a city's zone at `ms`, in minutes. Every zone here changes its
 * offset only on a whole UTC hour and at most once a day, so a UTC day whose
 * first and last hours agree has one offset throughout: one or two Intl calls
 * per city and day keep them off the per-transaction path.
 */
export function utcOffsetMinutes(city: number, ms: number): number {
  const day = Math.floor(ms / DAY_MS);
  const key = day * 64 + city;
  let off = offsetCache.get(key);
  if (off === undefined) {
    if (offsetCache.size > OFFSET_CACHE_LIMIT) offsetCache.clear();
    const zone = CITIES[city].zone;
    const startOff = computeOffsetMinutes(zone, day * DAY_MS);
    const endOff = computeOffsetMinutes(zone, day * DAY_MS + 23 * HOUR_MS);
    off = startOff === endOff ? startOff : Number.NaN;
    offsetCache.set(key, off);
  }
  if (!Number.isNaN(off)) return off;
  const hourKey = -(Math.floor(ms / HOUR_MS) * 64 + city) - 1;
  let hourly = offsetCache.get(hourKey);
  if (hourly === undefined) {
    hourly = computeOffsetMinutes(CITIES[city].zone, Math.floor(ms / HOUR_MS) * HOUR_MS);
    offsetCache.set(hourKey, hourly);
  }
  return hourly;
}

/** Minutes since local midnight in the city at `ms`. */
export function localMinuteOfDay(city: number, ms: number): number {
  const m = Math.floor(ms / 60_000) + utcOffsetMinutes(city, ms);
  return ((m % 1440) + 1440) % 1440;
}

/** Local hour (0-23) in the city at `ms`. */
export function localHour(city: number, ms: number): number {
  return Math.floor(localMinuteOfDay(city, ms) / 60);
}

/** The first instant at or after `ms` whose local time in the city is `minuteOfDay` (DST edges may shift it by the jump). */
export function nextLocalTime(city: number, ms: number, minuteOfDay: number): number {
  const now = localMinuteOfDay(city, ms);
  const ahead = (minuteOfDay - now + 1440) % 1440;
  return Math.floor(ms / 60_000) * 60_000 + ahead * 60_000;
}
