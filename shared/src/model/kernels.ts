/**
 * Histogram kernels of the trainer, shared by the calling thread and any
 * worker threads a HistogramExecutor runs (pure TypeScript, no I/O).
 *
 * Layout: for a unit with nC codes, H[code] sums the stored weights of
 * legitimate rows and H[nC + code] those of fraud rows; rows are grouped by
 * class, legitimate rows in [0, nNeg), fraud rows in [nNeg, n).
 *
 * Units are processed four at a time: one pass over the rows reads the row's
 * weight (or index and delta) once and adds it to four histograms, whose
 * read-modify-write chains are independent, so runs of equal codes do not
 * serialise the adds. Every histogram is summed in row order whatever the
 * grouping, so the result does not depend on how units are grouped or dealt
 * to threads.
 *
 * The functions refer only to their parameters and to each other: a worker
 * thread runs them from their source text (scripts/model/parallel-histograms.ts).
 */
import type { CodeArray } from './types';

/** Full rebuild of four units: H_u[code_u(i)] += w_i over all rows. */
export function build4(
  H0: Float64Array, H1: Float64Array, H2: Float64Array, H3: Float64Array,
  c0: Uint8Array, c1: Uint8Array, c2: Uint8Array, c3: Uint8Array,
  o0: number, o1: number, o2: number, o3: number,
  w: Float64Array, nNeg: number, n: number,
): void {
  H0.fill(0);
  H1.fill(0);
  H2.fill(0);
  H3.fill(0);
  for (let i = 0; i < nNeg; i++) {
    const d = w[i];
    H0[c0[i]] += d;
    H1[c1[i]] += d;
    H2[c2[i]] += d;
    H3[c3[i]] += d;
  }
  for (let i = nNeg; i < n; i++) {
    const d = w[i];
    H0[o0 + c0[i]] += d;
    H1[o1 + c1[i]] += d;
    H2[o2 + c2[i]] += d;
    H3[o3 + c3[i]] += d;
  }
}

/** Full rebuild of one unit (any code width). */
export function build1(H: Float64Array, c: CodeArray, o: number, w: Float64Array, nNeg: number, n: number): void {
  H.fill(0);
  for (let i = 0; i < nNeg; i++) H[c[i]] += w[i];
  for (let i = nNeg; i < n; i++) H[o + c[i]] += w[i];
}

/**
 * H_new = H_old + (ratio_y - 1) H_small for four units, over the small-side
 * rows idx[from..to) of one segment: legitimate rows in [from, negTo), fraud rows after.
 */
export function update4(
  H0: Float64Array, H1: Float64Array, H2: Float64Array, H3: Float64Array,
  c0: Uint8Array, c1: Uint8Array, c2: Uint8Array, c3: Uint8Array,
  o0: number, o1: number, o2: number, o3: number,
  idx: Int32Array, delta: Float64Array, from: number, negTo: number, to: number,
): void {
  for (let j = from; j < negTo; j++) {
    const i = idx[j];
    const d = delta[j];
    H0[c0[i]] += d;
    H1[c1[i]] += d;
    H2[c2[i]] += d;
    H3[c3[i]] += d;
  }
  for (let j = negTo; j < to; j++) {
    const i = idx[j];
    const d = delta[j];
    H0[o0 + c0[i]] += d;
    H1[o1 + c1[i]] += d;
    H2[o2 + c2[i]] += d;
    H3[o3 + c3[i]] += d;
  }
}

/** The small-side update of one unit (any code width). */
export function update1(H: Float64Array, c: CodeArray, o: number, idx: Int32Array, delta: Float64Array, from: number, negTo: number, to: number): void {
  for (let j = from; j < negTo; j++) H[c[idx[j]]] += delta[j];
  for (let j = negTo; j < to; j++) H[o + c[idx[j]]] += delta[j];
}

/**
 * One pass over the chosen unit's codes for the rows [from, to) of a segment
 * (legitimate rows before nNeg): F_i += alpha h(x_i), count training errors
 * (F = 0 counts as legitimate), collect the small-side rows into idx starting
 * at `from`. Writes [m, mNeg, errors] of the segment to out[3k..3k+2].
 */
export function scanSegment(
  col: Uint8Array | Uint16Array | Uint32Array,
  hv: Float64Array,
  isSmall: Uint8Array,
  Ft: Float64Array,
  idx: Int32Array,
  from: number,
  negEnd: number,
  to: number,
  out: Int32Array,
  k: number,
): void {
  let m = from;
  let errors = 0;
  for (let i = from; i < negEnd; i++) {
    const c = col[i];
    const v = Ft[i] + hv[c];
    Ft[i] = v;
    errors += v > 0 ? 1 : 0;
    idx[m] = i;
    m += isSmall[c];
  }
  const mNeg = m - from;
  for (let i = negEnd; i < to; i++) {
    const c = col[i];
    const v = Ft[i] + hv[c];
    Ft[i] = v;
    errors += v <= 0 ? 1 : 0;
    idx[m] = i;
    m += isSmall[c];
  }
  out[3 * k] = m - from;
  out[3 * k + 1] = mNeg;
  out[3 * k + 2] = errors;
}

/** Rescales a segment's small-side stored weights; delta_j = w_old (ratio_y - 1). */
export function rescaleSegment(
  idx: Int32Array,
  w: Float64Array,
  delta: Float64Array,
  from: number,
  negTo: number,
  to: number,
  ratioN: number,
  ratioP: number,
): void {
  const rn = ratioN - 1;
  const rp = ratioP - 1;
  for (let j = from; j < negTo; j++) {
    const i = idx[j];
    const wo = w[i];
    w[i] = wo * ratioN;
    delta[j] = wo * rn;
  }
  for (let j = negTo; j < to; j++) {
    const i = idx[j];
    const wo = w[i];
    w[i] = wo * ratioP;
    delta[j] = wo * rp;
  }
}

/**
 * Runs a rebuild (task 1) or a small-side update (task 2) over the given
 * units: byte-coded units in fours, the rest one by one. An update walks the
 * small-side rows segment by segment in row order: segment k starts at
 * segs[2k] in idx, and counts[3k], counts[3k + 1] are its m and mNeg.
 */
export function runUnits(
  task: number,
  units: number[],
  codes: CodeArray[],
  hist: Float64Array[],
  nCodes: number[],
  w: Float64Array,
  idx: Int32Array,
  delta: Float64Array,
  nNeg: number,
  n: number,
  segs: Int32Array,
  counts: Int32Array,
): void {
  const T = segs.length >> 1;
  const quad: number[] = [];
  const rest: number[] = [];
  for (const u of units) (codes[u] instanceof Uint8Array ? quad : rest).push(u);
  while (quad.length % 4 !== 0) rest.push(quad.pop()!);
  for (let k = 0; k < quad.length; k += 4) {
    const a = quad[k];
    const b = quad[k + 1];
    const c = quad[k + 2];
    const d = quad[k + 3];
    const ca = codes[a] as Uint8Array;
    const cb = codes[b] as Uint8Array;
    const cc = codes[c] as Uint8Array;
    const cd = codes[d] as Uint8Array;
    if (task === 1) build4(hist[a], hist[b], hist[c], hist[d], ca, cb, cc, cd, nCodes[a], nCodes[b], nCodes[c], nCodes[d], w, nNeg, n);
    else {
      for (let k = 0; k < T; k++) {
        const from = segs[2 * k];
        const negTo = from + counts[3 * k + 1];
        const to = from + counts[3 * k];
        update4(hist[a], hist[b], hist[c], hist[d], ca, cb, cc, cd, nCodes[a], nCodes[b], nCodes[c], nCodes[d], idx, delta, from, negTo, to);
      }
    }
  }
  for (const u of rest) {
    if (task === 1) build1(hist[u], codes[u], nCodes[u], w, nNeg, n);
    else {
      for (let k = 0; k < T; k++) {
        const from = segs[2 * k];
        update1(hist[u], codes[u], nCodes[u], idx, delta, from, from + counts[3 * k + 1], from + counts[3 * k]);
      }
    }
  }
}

/**
 * Runs one thread's part of a round's pass over the chosen unit (task 3):
 * scan segment k, then rescale its small side. Segment k covers rows
 * [segs[2k], segs[2k + 1]); params = [chosen unit, ratioN, ratioP].
 */
export function runScan(
  k: number,
  codes: CodeArray[],
  hv: Float64Array,
  isSmall: Uint8Array,
  Ft: Float64Array,
  w: Float64Array,
  idx: Int32Array,
  delta: Float64Array,
  nNeg: number,
  segs: Int32Array,
  counts: Int32Array,
  params: Float64Array,
): void {
  const from = segs[2 * k];
  const to = segs[2 * k + 1];
  scanSegment(codes[params[0]], hv, isSmall, Ft, idx, from, Math.min(Math.max(nNeg, from), to), to, counts, k);
  rescaleSegment(idx, w, delta, from, from + counts[3 * k + 1], from + counts[3 * k], params[1], params[2]);
}

/**
 * Shared state a HistogramExecutor's threads work on (all views over memory
 * from `allocate`). Row segments: thread k scans rows [segs[2k], segs[2k+1]);
 * counts[3k..3k+2] = its small-side m, mNeg and training errors.
 */
export interface HistogramState {
  codes: CodeArray[];
  hist: Float64Array[];
  nCodes: number[];
  w: Float64Array;
  idx: Int32Array;
  delta: Float64Array;
  Ft: Float64Array;
  hv: Float64Array;
  isSmall: Uint8Array;
  segs: Int32Array;
  counts: Int32Array;
  params: Float64Array;
  nNeg: number;
  n: number;
}

/**
 * Runs part of each round's work on other threads: histogram units for
 * rebuilds and updates, row segments for the scan of the chosen unit (e.g. Node
 * worker_threads over SharedArrayBuffer; see scripts/model/parallel-histograms.ts).
 * Each unit's histogram is computed by exactly one thread with the same
 * kernels in row order, so results are identical to single-threaded training.
 */
export interface HistogramExecutor {
  /** Memory the other threads can see (a SharedArrayBuffer for workers). */
  allocate(bytes: number): ArrayBufferLike;
  /** Hands the state over; returns the unit indices the calling thread keeps. */
  attach(state: HistogramState): number[];
  /** Threads in all, the calling one included (= row segments). */
  readonly threads: number;
  /** Starts the other threads: a full rebuild or small-side update of their units, or the scan of their row segment. */
  begin(task: 'rebuild' | 'update' | 'scan'): void;
  /** Blocks until the other threads are done. */
  end(): void;
  /** Releases the state (called when training ends, also on error). */
  detach(): void;
}
