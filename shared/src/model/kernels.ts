/**
 * Histogram kernels of the trainer, shared by the calling thread and any
 * worker threads a HistogramExecutor runs (pure TypeScript, no I/O).
 *
 * Layout: for a feature with nC codes, H[code] sums the stored weights of
 * legitimate rows and H[nC + code] those of fraud rows; rows are grouped by
 * class, legitimate rows in [0, nNeg), fraud rows in [nNeg, n).
 */
import type { CodeArray } from './types';

/** Per-class histogram of stored weights for one feature: H[code] (legitimate), H[nC + code] (fraud). */
export function buildHistogram(
  col: CodeArray,
  w: Float64Array,
  nNeg: number,
  n: number,
  H: Float64Array,
  nC: number,
  tmp: Float64Array,
  stride: number,
): void {
  // Four partial histograms, `stride` (>= 256) apart, break the store-to-load chain on runs of equal codes.
  const o1 = stride;
  const o2 = 2 * stride;
  const o3 = 3 * stride;
  tmp.fill(0, 0, o3 + nC);
  let i = 0;
  const e = nNeg - 3;
  for (; i < e; i += 4) {
    tmp[col[i]] += w[i];
    tmp[o1 + col[i + 1]] += w[i + 1];
    tmp[o2 + col[i + 2]] += w[i + 2];
    tmp[o3 + col[i + 3]] += w[i + 3];
  }
  for (; i < nNeg; i++) tmp[col[i]] += w[i];
  for (let b = 0; b < nC; b++) H[b] = tmp[b] + tmp[o1 + b] + tmp[o2 + b] + tmp[o3 + b];
  for (let b = nC; b < 2 * nC; b++) H[b] = 0;
  for (i = nNeg; i < n; i++) H[nC + col[i]] += w[i];
}

/**
 * H_new = H_old + (ratio_y - 1) H_small for one feature. Legitimate rows go
 * through four partial histograms (tmp, `stride` apart) so runs of equal
 * codes do not chain the add latency; the partial copies sit at least 256
 * slots apart because copies a few slots apart measured three times slower
 * (the adds of neighbouring copies still serialise). Fraud rows are few and
 * go straight in.
 */
export function addSmallSide(
  H: Float64Array,
  col: CodeArray,
  idx: Int32Array,
  delta: Float64Array,
  m: number,
  mNeg: number,
  off: number,
  tmp: Float64Array,
  stride: number,
): void {
  if (mNeg >= 64) {
    const o1 = stride;
    const o2 = 2 * stride;
    const o3 = 3 * stride;
    tmp.fill(0, 0, o3 + off);
    let j = 0;
    const e = mNeg - 3;
    for (; j < e; j += 4) {
      tmp[col[idx[j]]] += delta[j];
      tmp[o1 + col[idx[j + 1]]] += delta[j + 1];
      tmp[o2 + col[idx[j + 2]]] += delta[j + 2];
      tmp[o3 + col[idx[j + 3]]] += delta[j + 3];
    }
    for (; j < mNeg; j++) tmp[col[idx[j]]] += delta[j];
    for (let b = 0; b < off; b++) H[b] += tmp[b] + tmp[o1 + b] + tmp[o2 + b] + tmp[o3 + b];
  } else {
    for (let j = 0; j < mNeg; j++) H[col[idx[j]]] += delta[j];
  }
  for (let j = mNeg; j < m; j++) H[off + col[idx[j]]] += delta[j];
}


/** Shared state a HistogramExecutor's threads work on (all views over memory from `allocate`). */
export interface HistogramState {
  codes: CodeArray[];
  hist: Float64Array[];
  nCodes: number[];
  w: Float64Array;
  idx: Int32Array;
  delta: Float64Array;
  nNeg: number;
  n: number;
  stride: number;
}

/**
 * Runs part of the per-feature histogram work on other threads (e.g. Node
 * worker_threads over SharedArrayBuffer; see scripts/model/parallel-histograms.ts).
 * Each feature's histogram is computed by exactly one thread with the same
 * kernels, so results are identical to single-threaded training.
 */
export interface HistogramExecutor {
  /** Memory the other threads can see (a SharedArrayBuffer for workers). */
  allocate(bytes: number): ArrayBufferLike;
  /** Hands the state over; returns the feature indices the calling thread keeps. */
  attach(state: HistogramState): number[];
  /** Starts the other threads on their features: a full rebuild, or the small-side update of m rows. */
  begin(task: 'rebuild' | 'update', m: number, mNeg: number): void;
  /** Blocks until the other threads are done. */
  end(): void;
  /** Releases the state (called when training ends, also on error). */
  detach(): void;
}
