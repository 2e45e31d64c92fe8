import type { Redis } from 'ioredis';
import type { VelocitySnapshot } from '@shared/features/definitions';

/**
 * Per-card velocity state in Redis, read and updated by one Lua script so the
 * read-then-write is atomic: two workers scoring two transactions of the same
 * card never both count "before" the other, and replaying a transaction (a
 * retried job) returns the snapshot it got the first time instead of counting
 * it twice.
 *
 * Keys (all under one hash tag per card, so they stay on one Redis Cluster slot):
 *   <p>:vel:{<panHash>}        hash: home country, n and running mean of amounts
 *   <p>:vel:{<panHash>}:ts     zset: transaction id -> occurred-at (ms)
 *   <p>:vel:{<panHash>}:tx     hash: transaction id -> "amount|merchant|lat|lon"
 *   <p>:vel:{<panHash>}:done   hash: transaction id -> the snapshot it was given
 *   <p>:vel:{<panHash>}:dev    set of device ids seen
 * Windows are measured on the transactions' own times, so late arrivals land
 * where they belong; state older than 25 h behind the newest transaction is trimmed.
 */
const SCRIPT = `
local txn = ARGV[1]
local ts = tonumber(ARGV[2])
local amount = tonumber(ARGV[3])
local merchant = ARGV[4]
local lat = ARGV[5]
local lon = ARGV[6]
local device = ARGV[7]
local country = ARGV[8]
local ttl = tonumber(ARGV[9])

local done = redis.call('HGET', KEYS[4], txn)
if done then return done end

local home = redis.call('HGET', KEYS[1], 'home')
if not home then
  home = country
  redis.call('HSET', KEYS[1], 'home', country)
end

local c1, c24, s1, s24, small = 0, 0, 0, 0, 0
local merchants = {}
local distinct = 0
local ids = redis.call('ZRANGEBYSCORE', KEYS[2], '(' .. (ts - 86400000), '(' .. ts, 'WITHSCORES')
for i = 1, #ids, 2 do
  local detail = redis.call('HGET', KEYS[3], ids[i])
  local at = tonumber(ids[i + 1])
  if detail then
    local a, m = string.match(detail, '^([^|]*)|([^|]*)|')
    local av = tonumber(a) or 0
    c24 = c24 + 1
    s24 = s24 + av
    if not merchants[m] then merchants[m] = true; distinct = distinct + 1 end
    if at > ts - 3600000 then
      c1 = c1 + 1
      s1 = s1 + av
      if av < 2 then small = small + 1 end
    end
  end
end

local secs = ''
local dist = ''
local prev = redis.call('ZREVRANGEBYSCORE', KEYS[2], '(' .. ts, '-inf', 'WITHSCORES', 'LIMIT', 0, 1)
if #prev == 2 then
  secs = tostring((ts - tonumber(prev[2])) / 1000)
  local pd = redis.call('HGET', KEYS[3], prev[1])
  if pd and lat ~= '' and lon ~= '' then
    local plat, plon = string.match(pd, '^[^|]*|[^|]*|([^|]*)|([^|]*)$')
    if plat ~= nil and plat ~= '' and plon ~= '' then
      -- great-circle distance by the haversine formula, mean Earth radius 6371.0088 km (IUGG)
      local r = math.pi / 180
      local p1, p2 = tonumber(plat) * r, tonumber(lat) * r
      local dphi = p2 - p1
      local dl = (tonumber(lon) - tonumber(plon)) * r
      local h = math.sin(dphi / 2) ^ 2 + math.cos(p1) * math.cos(p2) * math.sin(dl / 2) ^ 2
      dist = tostring(2 * 6371.0088 * math.asin(math.min(1, math.sqrt(h))))
    end
  end
end

local n = tonumber(redis.call('HGET', KEYS[1], 'n') or '0')
local mean = tonumber(redis.call('HGET', KEYS[1], 'mean') or '0')
local usual = ''
if n >= 3 then usual = tostring(mean) end

local newdev = ''
if device ~= '' then
  local seen = redis.call('SISMEMBER', KEYS[5], device)
  if n == 0 or seen == 1 then newdev = '0' else newdev = '1' end
  redis.call('SADD', KEYS[5], device)
end

redis.call('ZADD', KEYS[2], ts, txn)
redis.call('HSET', KEYS[3], txn, ARGV[3] .. '|' .. merchant .. '|' .. lat .. '|' .. lon)
n = n + 1
mean = mean + (amount - mean) / n
redis.call('HSET', KEYS[1], 'n', n, 'mean', mean)

local newest = redis.call('ZREVRANGE', KEYS[2], 0, 0, 'WITHSCORES')
local cutoff = tonumber(newest[2]) - 90000000
local old = redis.call('ZRANGEBYSCORE', KEYS[2], '-inf', '(' .. cutoff)
for i = 1, #old do
  redis.call('HDEL', KEYS[3], old[i])
  redis.call('HDEL', KEYS[4], old[i])
end
if #old > 0 then redis.call('ZREMRANGEBYSCORE', KEYS[2], '-inf', '(' .. cutoff) end

local snap = home .. '|' .. c1 .. '|' .. c24 .. '|' .. s1 .. '|' .. s24 .. '|' .. small .. '|' .. distinct .. '|' .. secs .. '|' .. dist .. '|' .. usual .. '|' .. newdev
redis.call('HSET', KEYS[4], txn, snap)
for i = 1, 5 do redis.call('EXPIRE', KEYS[i], ttl) end
return snap
`;

export interface VelocityEvent {
  transactionId: string;
  occurredAt: Date;
  amount: number;
  merchantRef: string;
  merchantCountry: string;
  lat: number | null;
  lon: number | null;
  deviceId: string | null;
}

type VelocityRedis = Redis & {
  edgecaseVelocity(k1: string, k2: string, k3: string, k4: string, k5: string, ...args: (string | number)[]): Promise<string>;
};

const num = (s: string | undefined): number | null => (s === undefined || s === '' ? null : Number(s));

export function parseSnapshot(raw: string): VelocitySnapshot {
  const p = raw.split('|');
  return {
    homeCountry: p[0] || null,
    count1h: Number(p[1]),
    count24h: Number(p[2]),
    sum1h: Number(p[3]),
    sum24h: Number(p[4]),
    small1h: Number(p[5]),
    distinctMerchants24h: Number(p[6]),
    secondsSincePrev: num(p[7]),
    distanceKm: num(p[8]),
    usualAmount: num(p[9]),
    newDevice: p[10] === '' || p[10] === undefined ? null : p[10] === '1',
  };
}

export class VelocityStore {
  private readonly redis: VelocityRedis;

  /** `ttlSeconds`: how long a quiet card's state is kept (default 3 days). */
  constructor(
    redis: Redis,
    private readonly prefix: string,
    private readonly ttlSeconds = 3 * 86_400,
  ) {
    if (!('edgecaseVelocity' in redis)) redis.defineCommand('edgecaseVelocity', { numberOfKeys: 5, lua: SCRIPT });
    this.redis = redis as VelocityRedis;
  }

  private keys(cardKey: string): [string, string, string, string, string] {
    const base = `${this.prefix}:vel:{${cardKey}}`;
    return [base, `${base}:ts`, `${base}:tx`, `${base}:done`, `${base}:dev`];
  }

  /** Records the transaction on the card and returns the state as it was just before it. */
  async observe(cardKey: string, e: VelocityEvent): Promise<VelocitySnapshot> {
    const raw = await this.redis.edgecaseVelocity(
      ...this.keys(cardKey),
      e.transactionId,
      e.occurredAt.getTime(),
      String(e.amount),
      e.merchantRef.replace(/\|/g, '/'),
      e.lat === null ? '' : String(e.lat),
      e.lon === null ? '' : String(e.lon),
      e.deviceId ?? '',
      e.merchantCountry,
      this.ttlSeconds,
    );
    return parseSnapshot(raw);
  }

  /** Observes many transactions in one round trip (a pipeline); order within a card is kept. */
  async observeMany(items: { cardKey: string; event: VelocityEvent }[]): Promise<VelocitySnapshot[]> {
    const pipeline = this.redis.pipeline() as unknown as { edgecaseVelocity: VelocityRedis['edgecaseVelocity']; exec(): Promise<[Error | null, unknown][] | null> };
    for (const { cardKey, event: e } of items) {
      pipeline.edgecaseVelocity(
        ...this.keys(cardKey),
        e.transactionId,
        e.occurredAt.getTime(),
        String(e.amount),
        e.merchantRef.replace(/\|/g, '/'),
        e.lat === null ? '' : String(e.lat),
        e.lon === null ? '' : String(e.lon),
        e.deviceId ?? '',
        e.merchantCountry,
        this.ttlSeconds,
      );
    }
    const results = (await pipeline.exec()) ?? [];
    return results.map(([err, raw]) => {
      if (err) throw err;
      return parseSnapshot(String(raw));
    });
  }
}
