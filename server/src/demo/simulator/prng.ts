/**
 * Seeded randomness for the demo simulator. Everything the simulator draws
 * comes from here, so one seed fixes the whole invented world and its traffic.
 *
 * Streams are cut into many short, independent sub-streams (one per cardholder
 * attribute, per time window, per trip block) whose seeds are hashes of the
 * world seed and a few integers. That is what lets the history be generated in
 * any chunking and still give every transaction the same id and content.
 */

/** Murmur3's 32-bit finaliser (Appleby, MurmurHash3, public domain): full avalanche of one word. */
function fmix32(h: number): number {
  h ^= h >>> 16;
  h = Math.imul(h, 0x85ebca6b);
  h ^= h >>> 13;
  h = Math.imul(h, 0xc2b2ae35);
  h ^= h >>> 16;
  return h >>> 0;
}

/**
 * 32-bit hash of a list of non-negative integers (up to 2^53, so epoch
 * milliseconds fit): both 32-bit halves of every part are mixed in.
 */
export function hash32(...parts: number[]): number {
  let h = 0x9e3779b9;
  for (const p of parts) {
    h = fmix32((h ^ (p >>> 0)) + 0x7f4a7c15);
    h = fmix32((h ^ Math.floor(p / 4294967296)) + 0x165667b1);
  }
  return h;
}

/** FNV-1a (Fowler, Noll, Vo) of a string: turns a tag or a string seed into an integer. */
export function hashString(s: string): number {
  let h = 0x811c9dc5;
  for (let i = 0; i < s.length; i++) {
    h ^= s.charCodeAt(i);
    h = Math.imul(h, 0x01000193);
  }
  return h >>> 0;
}

/**
 * Mulberry32 (Tommy Ettinger, public domain): a 32-bit state generator with
 * period 2^32. Plenty for the short sub-streams it serves here, and tiny.
 */
export class Rng {
  private state: number;

  constructor(seed: number) {
    this.state = seed >>> 0;
  }

  /** Uniform in [0, 1). */
  next(): number {
    let t = (this.state = (this.state + 0x6d2b79f5) >>> 0);
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  }

  /** Uniform in [lo, hi). */
  range(lo: number, hi: number): number {
    return lo + (hi - lo) * this.next();
  }

  /** Uniform integer in [lo, hi], both ends included. */
  int(lo: number, hi: number): number {
    return lo + Math.floor(this.next() * (hi - lo + 1));
  }

  chance(p: number): boolean {
    return this.next() < p;
  }

  pick<T>(items: readonly T[]): T {
    return items[Math.floor(this.next() * items.length)];
  }

  /** Standard normal by the Box-Muller transform (Box & Muller, 1958); one value per call keeps streams simple. */
  normal(): number {
    const u = Math.max(this.next(), 1e-12);
    return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * this.next());
  }

  /** Log-normal with the given median (e^mu) and log-scale sigma. */
  logNormal(median: number, sigma: number): number {
    return median * Math.exp(sigma * this.normal());
  }

  /** Exponential with the given mean, by inversion. */
  exponential(mean: number): number {
    return -mean * Math.log(1 - this.next());
  }

  /**
   * Poisson count: Knuth's multiplication method for small means, a rounded
   * normal approximation above 30 where the two agree closely enough for traffic.
   */
  poisson(mean: number): number {
    if (mean <= 0) return 0;
    if (mean > 30) return Math.max(0, Math.round(mean + Math.sqrt(mean) * this.normal()));
    const limit = Math.exp(-mean);
    let k = 0;
    let p = this.next();
    while (p > limit) {
      k++;
      p *= this.next();
    }
    return k;
  }

  /** Index drawn from cumulative weights (ascending, last = total) by binary search. */
  weighted(cumulative: Float64Array | readonly number[]): number {
    const n = cumulative.length;
    const u = this.next() * cumulative[n - 1];
    let lo = 0;
    let hi = n - 1;
    while (lo < hi) {
      const mid = (lo + hi) >>> 1;
      if (cumulative[mid] > u) hi = mid;
      else lo = mid + 1;
    }
    return lo;
  }
}

/** Running sums of `weights`, the form `Rng.weighted` takes. */
export function cumulative(weights: readonly number[]): Float64Array {
  const out = new Float64Array(weights.length);
  let sum = 0;
  for (let i = 0; i < weights.length; i++) {
    sum += weights[i];
    out[i] = sum;
  }
  return out;
}

/**
 * Walker's alias method in Vose's numerically stable form (Vose, "A linear
 * algorithm for generating random numbers with a given distribution", IEEE
 * TSE 1991): O(1) draws from a fixed discrete distribution, which the
 * arrival process needs for every candidate transaction.
 */
export class AliasTable {
  private readonly prob: Float64Array;
  private readonly alias: Uint32Array;

  constructor(weights: ArrayLike<number>) {
    const n = weights.length;
    if (n === 0) throw new RangeError('AliasTable needs at least one weight');
    let total = 0;
    for (let i = 0; i < n; i++) total += weights[i];
    if (!(total > 0)) throw new RangeError('AliasTable needs a positive total weight');
    this.prob = new Float64Array(n);
    this.alias = new Uint32Array(n);
    const scaled = new Float64Array(n);
    const small: number[] = [];
    const large: number[] = [];
    for (let i = 0; i < n; i++) {
      scaled[i] = (weights[i] * n) / total;
      (scaled[i] < 1 ? small : large).push(i);
    }
    while (small.length > 0 && large.length > 0) {
      const s = small.pop()!;
      const l = large.pop()!;
      this.prob[s] = scaled[s];
      this.alias[s] = l;
      scaled[l] = scaled[l] + scaled[s] - 1;
      (scaled[l] < 1 ? small : large).push(l);
    }
    // Whatever is left is 1 up to rounding.
    for (const i of large) this.prob[i] = 1;
    for (const i of small) this.prob[i] = 1;
  }

  draw(rng: Rng): number {
    const u = rng.next() * this.prob.length;
    const i = Math.floor(u);
    return u - i < this.prob[i] ? i : this.alias[i];
  }
}
