/**
 * Training: discrete AdaBoost over the dictionary of all decision stumps, seen
 * as coordinate descent on the exponential loss (Freund & Schapire 1997;
 * Breiman 1999; Mason, Baxter, Bartlett & Frean 2000; Friedman, Hastie &
 * Tibshirani 2000).
 *
 * Notation (kept in the code):
 *   n rows x_i with y_i in {-1, +1}; p stumps h_j; M_ij = y_i h_j(x_i);
 *   lambda the stump coefficients, F(x) = sum_j lambda_j h_j(x), so
 *   (M lambda)_i = y_i F(x_i) is the margin of row i;
 *   R(lambda) = sum_i d0_i exp(-(M lambda)_i) (d0 = start weights, sum 1).
 * Round t:
 *   d_i proportional to d0_i exp(-(M lambda)_i), sum 1;
 *   edge r_j = sum_i d_i M_ij = 1 - 2 eps_j (eps_j the weighted error);
 *   j_t = argmax_j |r_j| from per-feature histograms of d_i by class and
 *   their cumulative sums: for a cut k, r = s (2 S_right - T), S_right the sum
 *   of d_i y_i over rows on the right side, T = sum_i d_i y_i (O(n F), not O(n p));
 *   alpha_t = 1/2 ln((1 + r) / (1 - r)) = 1/2 ln((1 - eps) / eps), times nu;
 *   d_i <- d_i exp(-alpha_t M_{i j_t}) / Z_t,  Z_t = sqrt(1 - r^2) at a full step.
 *
 * Speed: bin codes are stored column-major (one typed array per feature) with
 * rows grouped by class (legitimate first, then fraud), and weights are kept
 * as "stored" values w_i with one scale per class, true d_i = g_y w_i. A round
 * multiplies every row by a factor that depends only on (side of the split, y):
 * the big side's factor goes into g_y and only the rows on the smaller side
 * are rescaled, by ratio_y = factor(small, y) / factor(big, y). Every feature's
 * histograms then change by (ratio_y - 1) times the histogram of those rows
 * alone, H_new = H_old + (ratio_y - 1) H_small, which is exact; histograms are
 * rebuilt from all rows every `rebuildEvery` rounds so rounding cannot drift.
 * The histogram passes walk four units at once (kernels.ts); with a
 * HistogramExecutor, units are split over threads for the histogram work and
 * rows for the scan of the chosen unit, with the same sums in the same order.
 *
 * Missing values: a numeric stump sends missing values to whichever side
 * gives the larger |edge| (both are candidates; on a tie the left side). If no
 * training row was missing, missing goes left. The missingness indicator
 * (right side = missing only) is one more candidate per feature.
 *
 * Tie-break (deterministic, shared with the Python reference used in tests):
 * features in model order; numeric cuts ascending, for each cut "missing left"
 * before "missing right", then the missingness indicator; categorical codes
 * ascending. A later candidate wins only if its |edge| is larger by more than
 * TIE_TOLERANCE, so float rounding in the sums cannot flip a true tie.
 */
import { applyBinning, codeCount, fitBinning, type Binning } from './binning';
import { TrainingError } from './errors';
import { runScan, runUnits, type HistogramExecutor } from './kernels';
import type { Model, Stump, TrainingSummary } from './model-schema';
import { MODEL_FORMAT, MODEL_SCHEMA_VERSION } from './model-schema';
import { parseTrainOptions, type TrainOptions, type TrainOptionsInput } from './options';
import type { CodeArray, FeatureSpec, LabelledSet, TrainingData } from './types';

/** A later candidate must beat the best |edge| by more than this to win. */
export const TIE_TOLERANCE = 1e-12;
/** eps is clipped to [EPS_CLIP, 1 - EPS_CLIP] before the log in alpha. */
export const EPS_CLIP = 1e-10;
/** |edge| at or below this counts as "no better than chance". */
export const MIN_EDGE = 1e-12;

/** One boosting round as recorded in the trace. */
export interface RoundTrace {
  /** 1-based round number t. */
  round: number;
  feature: string;
  featureIndex: number;
  kind: 'numeric' | 'categorical';
  /** Raw threshold (numeric; null for the missingness indicator or categorical). */
  threshold: number | null;
  /** Category matched (categorical, kept category), else null. */
  category: string | null;
  /** Categorical: what the matched code is; numeric: null. */
  match: 'category' | 'other' | 'missing' | null;
  /** Numeric: where missing values go. */
  missingRight: boolean | null;
  /** Polarity s: h(x) = s on the right side (x > threshold, or the matched category). */
  polarity: 1 | -1;
  /** Edge r_t = sum_i d_i M_{i j_t} >= 0. */
  edge: number;
  /** Weighted error eps_t = (1 - r_t) / 2. */
  weightedError: number;
  /** Coefficient added this round: nu * alpha_t. */
  alpha: number;
  /** Z_t = sum_i d_i exp(-nu alpha_t M_{i j_t}). */
  Z: number;
  /** Start-weighted training exponential loss sum_i d0_i exp(-y_i F(x_i)) = prod_{s<=t} Z_s. */
  trainLoss: number;
  /** Fraction of training rows with sign(F) != y (F = 0 counts as legitimate). */
  trainError: number;
  /** Validation exponential loss with the same class weights (null without validation). */
  validationLoss: number | null;
  validationError: number | null;
}

export interface TrainResult {
  model: Model;
  trace: RoundTrace[];
}

/** Per-round hooks of `trainModel` (progress reports, cooperative cancellation); both run synchronously. */
export interface TrainHooks {
  onRound?(t: RoundTrace): void;
  shouldStop?(): boolean;
  /**
   * Optional: runs part of the histogram work on other threads. Training is
   * identical with or without it (each feature's histogram is built by one thread).
   */
  histograms?: HistogramExecutor;
}

interface Candidate {
  f: number;
  /** numeric: cut k (k = K: missingness indicator); categorical: code. */
  k: number;
  missingRight: boolean;
  polarity: 1 | -1;
  /** |edge| normalised by the total weight. */
  edge: number;
}

function checkLabels(labels: Int8Array, what: string): { nPos: number; nNeg: number } {
  if (!(labels instanceof Int8Array)) throw new TrainingError('bad-data', `${what} labels must be an Int8Array of +1/-1`);
  let nPos = 0;
  let nNeg = 0;
  for (let i = 0; i < labels.length; i++) {
    const y = labels[i];
    if (y === 1) nPos++;
    else if (y === -1) nNeg++;
    else throw new TrainingError('bad-data', `${what} label at row ${i + 1} is ${y}; expected +1 (fraud) or -1 (legitimate)`);
  }
  return { nPos, nNeg };
}

function checkColumns(set: LabelledSet, features: FeatureSpec[], what: string): void {
  const n = set.labels.length;
  for (const f of features) {
    const col = set.columns[f.name];
    if (col === undefined) throw new TrainingError('bad-data', `${what} set has no column for feature "${f.name}"`);
    if (col.length !== n) {
      throw new TrainingError('bad-data', `${what} column "${f.name}" has ${col.length} rows but there are ${n} labels`);
    }
  }
}

/**
 * Trains the model.
 *
 * @param data features (name, kind) in model order; `columns` by name, each of
 *   length n (Float64Array with NaN for missing, or (string | null)[]);
 *   `labels` Int8Array of +1 (fraud) / -1 (legitimate); optional `validation`
 *   with the same columns, used for the trace and early stopping.
 * @param optionsInput see `trainOptionsSchema` (validated; throws OptionsError).
 * @returns the fitted model (no calibration yet: see `calibratePlatt` /
 *   `withCalibration`) and the per-round trace.
 * @param hooks optional, called synchronously inside the round loop: `onRound`
 *   after every recorded round with its trace entry; `shouldStop` at the end of
 *   each round, and `true` ends training there with the rounds so far (the
 *   summary then reads as a shorter round budget, stoppedBy "rounds"; with
 *   early stopping the best round so far is kept).
 * @throws TrainingError for one class only, empty data, bad columns, no stump
 *   better than chance at round 1, or weight overflow.
 */
export function trainModel(data: TrainingData, optionsInput?: TrainOptionsInput, hooks?: TrainHooks): TrainResult {
  const opts = parseTrainOptions(optionsInput);
  const features = data.features;
  if (!Array.isArray(features) || features.length === 0) throw new TrainingError('bad-data', 'No features to train on');
  if (new Set(features.map((f) => f.name)).size !== features.length) throw new TrainingError('bad-data', 'Feature names must be unique');
  const n = data.labels?.length ?? 0;
  if (n === 0) throw new TrainingError('bad-data', 'Training set is empty');
  const { nPos, nNeg } = checkLabels(data.labels, 'Training');
  if (nPos === 0 || nNeg === 0) {
    throw new TrainingError(
      'one-class',
      `Training set has one class only (${nPos} fraud, ${nNeg} legitimate rows); both are needed`,
    );
  }
  checkColumns(data, features, 'Training');
  const val = data.validation;
  let vCounts = { nPos: 0, nNeg: 0 };
  if (val) {
    vCounts = checkLabels(val.labels, 'Validation');
    checkColumns(val, features, 'Validation');
  }
  if (opts.earlyStopping && !val) throw new TrainingError('bad-data', 'Early stopping needs a validation set');

  const binning = fitBinning(data.columns, features, {
    maxBins: opts.maxBins,
    exact: opts.exact,
    minCategoryCount: opts.minCategoryCount,
    sampleSize: opts.binSampleSize,
    seed: opts.seed,
  });

  // Rows grouped by class: legitimate rows [0, nNeg), fraud rows [nNeg, n).
  const order = new Int32Array(n);
  {
    let a = 0;
    let b = nNeg;
    for (let i = 0; i < n; i++) order[data.labels[i] === 1 ? b++ : a++] = i;
  }
  const alloc = hooks?.histograms ? (bytes: number) => hooks.histograms!.allocate(bytes) : undefined;
  const codes = applyBinning(binning, data.columns, order, alloc);
  const vCodes = val ? applyBinning(binning, val.columns) : null;
  let core: BoostResult;
  try {
    core = boost(binning, codes, nNeg, n, vCodes, val ? val.labels : null, opts, hooks);
  } finally {
    hooks?.histograms?.detach();
  }

  const model = buildModel(binning, features, core, opts, {
    nTrain: n,
    nTrainPositive: nPos,
    nValidation: val ? val.labels.length : 0,
    nValidationPositive: vCounts.nPos,
  });
  return { model, trace: core.trace };
}

interface BoostResult {
  chosen: Candidate[];
  alphas: number[];
  trace: RoundTrace[];
  bestRound: number;
  stoppedBy: TrainingSummary['stoppedBy'];
  /** counts[f][code] over training rows, for E[g_f]. */
  counts: Int32Array[];
}

/** Side table of a candidate: side[code] = 1 if the code is on the right side. */
function sideTable(binning: Binning, c: Candidate): Uint8Array {
  const b = binning.features[c.f];
  const nC = codeCount(b);
  const side = new Uint8Array(nC);
  const miss = nC - 1;
  if (b.kind === 'numeric') {
    for (let code = c.k + 1; code < miss; code++) side[code] = 1;
    side[miss] = c.missingRight ? 1 : 0;
  } else {
    side[c.k] = 1;
  }
  return side;
}

function describe(binning: Binning, c: Candidate) {
  const b = binning.features[c.f];
  if (b.kind === 'numeric') {
    return {
      feature: b.name,
      kind: 'numeric' as const,
      threshold: c.k < b.cuts.length ? b.cuts[c.k] : null,
      category: null,
      match: null,
      missingRight: c.missingRight,
    };
  }
  const C = b.categories.length;
  const match = c.k < C ? ('category' as const) : c.k === C ? ('other' as const) : ('missing' as const);
  return {
    feature: b.name,
    kind: 'categorical' as const,
    threshold: null,
    category: c.k < C ? b.categories[c.k] : null,
    match,
    missingRight: null,
  };
}


// ---------------------------------------------------------------------------
// Hot loops, kept as small top-level functions so the JIT sees one array type
// each (Uint8Array codes in quantile mode) and optimises them in isolation.

function scaleRange(w: Float64Array, from: number, to: number, g: number): void {
  for (let i = from; i < to; i++) w[i] *= g;
}

/** Best candidate so far in a round's search (mutated in place: no allocation per candidate). */
interface SearchState {
  bestAbs: number;
  found: boolean;
  any: boolean;
  f: number;
  k: number;
  missingRight: boolean;
  polarity: 1 | -1;
}

/**
 * One candidate stump with raw edge `raw` (= W r): it becomes the best so far
 * only if |raw| beats `bestRaw` by more than `tol` (the tie-break rule).
 * Returns the new best |raw|.
 */
function offer(st: SearchState, raw: number, bestRaw: number, tol: number, f: number, k: number, missingRight: boolean): number {
  st.any = true;
  const abs = raw < 0 ? -raw : raw;
  if (!(abs > bestRaw + tol)) return bestRaw;
  st.found = true;
  st.f = f;
  st.k = k;
  st.missingRight = missingRight;
  st.polarity = raw < 0 ? -1 : 1;
  return abs;
}

/**
 * Scans every stump of one feature (see the tie-break rule in the module doc)
 * and updates `st`. r = s (2 S_right - T) / W with S_right the sum of d_i y_i on
 * the right side, from cumulative sums of the per-class histograms in true
 * units (g_+ H_+ - g_- H_-). Returns W, the feature's total true weight.
 */
function searchFeature(
  H: Float64Array,
  nC: number,
  cnt: Int32Array,
  numeric: boolean,
  f: number,
  gP: number,
  gN: number,
  n: number,
  st: SearchState,
): number {
  let T = 0;
  let W = 0;
  for (let b = 0; b < nC; b++) {
    const p = gP * H[nC + b];
    const q = gN * H[b];
    T += p - q;
    W += p + q;
  }
  if (!(W > 0) || !Number.isFinite(W)) return W;
  const tol = TIE_TOLERANCE * W;
  const startRaw = st.bestAbs * W;
  let bestRaw = startRaw;
  if (numeric) {
    const miss = nC - 1;
    const K = nC - 2; // number of cuts; value bins 0..K
    const sMiss = gP * H[nC + miss] - gN * H[miss];
    const cMiss = cnt[miss];
    const tVal = T - sMiss;
    let left = 0;
    let nLeft = 0;
    for (let k = 0; k < K; k++) {
      left += gP * H[nC + k] - gN * H[k];
      nLeft += cnt[k];
      const sRight = tVal - left;
      const nRight = n - cMiss - nLeft;
      if (nRight !== 0 && nRight !== n) bestRaw = offer(st, 2 * sRight - T, bestRaw, tol, f, k, false);
      if (cMiss > 0) {
        const nR = nRight + cMiss;
        if (nR !== 0 && nR !== n) bestRaw = offer(st, 2 * (sRight + sMiss) - T, bestRaw, tol, f, k, true);
      }
    }
    if (cMiss > 0 && cMiss !== n) bestRaw = offer(st, 2 * sMiss - T, bestRaw, tol, f, K, true);
  } else {
    for (let c = 0; c < nC; c++) {
      const nRight = cnt[c];
      if (nRight !== 0 && nRight !== n) bestRaw = offer(st, 2 * (gP * H[nC + c] - gN * H[c]) - T, bestRaw, tol, f, c, false);
    }
  }
  if (bestRaw !== startRaw) st.bestAbs = bestRaw / W;
  return W;
}

/**
 * Histogram units: a feature on its own, or a bundle of low-cardinality
 * features sharing one byte per row (joint code sum_k b_k(x) * mult_k, at most
 * 256 codes). Each member's histogram is the exact marginal of the joint one,
 * and one gather per row serves every member: fewer passes per round.
 */
interface Unit {
  features: number[];
  mult: number[];
  /** Number of joint codes (= nCodes of a lone feature). */
  J: number;
}

function planUnits(nCodes: number[], codes: CodeArray[], enabled: boolean): Unit[] {
  const units: Unit[] = [];
  const small: number[] = [];
  nCodes.forEach((nC, f) => {
    if (enabled && codes[f] instanceof Uint8Array && nC <= 128) small.push(f);
    else units.push({ features: [f], mult: [1], J: nC });
  });
  // First fit, largest first (a deterministic packing; any packing gives the same histograms).
  small.sort((a, b) => nCodes[b] - nCodes[a] || a - b);
  const bundles: Unit[] = [];
  for (const f of small) {
    const u = bundles.find((b) => b.J * nCodes[f] <= 256);
    if (u) {
      u.mult.push(u.J);
      u.features.push(f);
      u.J *= nCodes[f];
    } else bundles.push({ features: [f], mult: [1], J: nCodes[f] });
  }
  return [...units, ...bundles];
}

function boost(
  binning: Binning,
  codes: CodeArray[],
  nNeg: number,
  n: number,
  vCodes: CodeArray[] | null,
  vLabels: Int8Array | null,
  opts: TrainOptions,
  hooks?: TrainHooks,
): BoostResult {
  const F = codes.length;
  const nCodes = binning.features.map(codeCount);
  const isNumeric = binning.features.map((b) => b.kind === 'numeric');

  const counts = codes.map((col, f) => {
    const c = new Int32Array(nCodes[f]);
    for (let i = 0; i < n; i++) c[col[i]]++;
    return c;
  });

  // Start weights d0: class weights, normalised. Stored weights start at 1; scales carry the rest.
  const cN = opts.classWeights.negative;
  const cP = opts.classWeights.positive;
  const nPos = n - nNeg;
  const totalStart = cN * nNeg + cP * nPos;
  let gN = cN / totalStart;
  let gP = cP / totalStart;
  // Arrays other threads read or write come from the executor's allocator (shared memory).
  const exec = hooks?.histograms;
  const f64 = (len: number) => (exec ? new Float64Array(exec.allocate(8 * len) as ArrayBuffer) : new Float64Array(len));
  const i32 = (len: number) => (exec ? new Int32Array(exec.allocate(4 * len) as ArrayBuffer) : new Int32Array(len));
  const w = f64(n).fill(1);
  const Ft = f64(n);
  const idx = i32(n);
  const delta = f64(n);
  // Row segments, one per thread: legitimate rows split evenly, fraud rows with the last segment.
  const T = exec?.threads ?? 1;
  const segs = i32(2 * T);
  for (let k = 0; k < T; k++) {
    segs[2 * k] = Math.floor((k * nNeg) / T);
    segs[2 * k + 1] = k === T - 1 ? n : Math.floor(((k + 1) * nNeg) / T);
  }
  const segCounts = i32(3 * T);
  const params = f64(3);

  const units = planUnits(nCodes, codes, opts.bundleFeatures);
  const unitOf = new Int32Array(F);
  const decode: (Uint8Array | null)[] = new Array(F).fill(null);
  const unitCodes: CodeArray[] = units.map((u, ui) => {
    u.features.forEach((f) => (unitOf[f] = ui));
    if (u.features.length === 1) return codes[u.features[0]];
    const out = exec ? new Uint8Array(exec.allocate(n) as ArrayBuffer) : new Uint8Array(n);
    u.features.forEach((f, k) => {
      const col = codes[f];
      const mult = u.mult[k];
      for (let i = 0; i < n; i++) out[i] += col[i] * mult;
      const dec = new Uint8Array(u.J);
      for (let j = 0; j < u.J; j++) dec[j] = Math.floor(j / mult) % nCodes[f];
      decode[f] = dec;
    });
    return out;
  });
  const unitN = units.map((u) => u.J);
  const hist = unitN.map((J) => f64(2 * J));
  // Per-feature histograms the search reads: the unit's own for a lone feature, a marginal for a bundle member.
  const mhist = nCodes.map((nC, f) => (decode[f] ? new Float64Array(2 * nC) : hist[unitOf[f]]));
  const bundled = units.filter((u) => u.features.length > 1);
  const marginalize = () => {
    for (const u of bundled) {
      const H = hist[unitOf[u.features[0]]];
      const J = u.J;
      for (const f of u.features) {
        const M = mhist[f];
        const dec = decode[f]!;
        const nC = nCodes[f];
        M.fill(0);
        for (let j = 0; j < J; j++) {
          M[dec[j]] += H[j];
          M[nC + dec[j]] += H[J + j];
        }
      }
    }
  };

  const maxJ = Math.max(...unitN);
  const hvJ = f64(maxJ);
  const isSmall = exec ? new Uint8Array(exec.allocate(maxJ) as ArrayBuffer) : new Uint8Array(maxJ);
  const allUnits = units.map((_, u) => u);
  const local = exec
    ? exec.attach({ codes: unitCodes, hist, nCodes: unitN, w, idx, delta, Ft, hv: hvJ, isSmall, segs, counts: segCounts, params, nNeg, n })
    : allUnits;
  const rebuild = () => {
    exec?.begin('rebuild');
    runUnits(1, local, unitCodes, hist, unitN, w, idx, delta, nNeg, n, segs, segCounts);
    exec?.end();
  };
  const absorbScales = () => {
    scaleRange(w, 0, nNeg, gN);
    scaleRange(w, nNeg, n, gP);
    gN = 1;
    gP = 1;
  };
  const search: SearchState = { bestAbs: -1, found: false, any: false, f: 0, k: 0, missingRight: false, polarity: 1 };
  rebuild();

  // Validation state.
  const nv = vLabels ? vLabels.length : 0;
  const Fv = new Float64Array(nv);
  const vWeightTotal = vLabels ? vLabels.reduce((s, y) => s + (y === 1 ? cP : cN), 0) : 0;

  const chosen: Candidate[] = [];
  const alphas: number[] = [];
  const trace: RoundTrace[] = [];
  let trainLoss = 1;
  let bestRound = 0;
  let bestVal = Infinity;
  let stoppedBy: TrainingSummary['stoppedBy'] = 'rounds';
  const nu = opts.shrinkage;

  for (let t = 1; t <= opts.rounds; t++) {
    // --- Direction: steepest coordinate over all stumps, from the histograms.
    marginalize();
    search.bestAbs = -1;
    search.found = false;
    search.any = false;
    let Wtot = 0;
    for (let f = 0; f < F; f++) {
      const W = searchFeature(mhist[f], nCodes[f], counts[f], isNumeric[f], f, gP, gN, n, search);
      if (f === 0) Wtot = W;
      if (!(W > 0) || !Number.isFinite(W)) {
        throw new TrainingError('overflow', `Weights overflowed or vanished at round ${t} (total weight ${W}); try shrinkage < 1`);
      }
    }
    const anyCandidate = search.any;
    const best: Candidate | null = search.found
      ? { f: search.f, k: search.k, missingRight: search.missingRight, polarity: search.polarity, edge: search.bestAbs }
      : null;
    if (!anyCandidate) throw new TrainingError('no-candidate', 'Every feature is constant on the training rows: no stump can split them');
    const cand = best as Candidate | null;
    if (!cand || !(cand.edge > MIN_EDGE) || !Number.isFinite(cand.edge)) {
      if (t === 1) {
        throw new TrainingError(
          'no-edge',
          'No stump beats chance at round 1 (best weighted error 0.5): the features carry no signal for these labels',
        );
      }
      stoppedBy = 'no-edge';
      break;
    }

    // --- Line search (closed form for +/-1 learners), eps clipped before the log.
    const r = Math.min(cand.edge, 1);
    const eps = (1 - r) / 2;
    const epsC = Math.min(Math.max(eps, EPS_CLIP), 1 - EPS_CLIP);
    const alphaFull = 0.5 * Math.log((1 - epsC) / epsC);
    const alpha = nu * alphaFull;
    const s = cand.polarity;

    // Weight by (side, class) in true units, from the chosen feature's histogram.
    const side = sideTable(binning, cand);
    const nC = nCodes[cand.f];
    const H = mhist[cand.f];
    let WRp = 0;
    let WRn = 0;
    let WLp = 0;
    let WLn = 0;
    let nRight = 0;
    for (let b = 0; b < nC; b++) {
      if (side[b]) {
        WRp += gP * H[nC + b];
        WRn += gN * H[b];
        nRight += counts[cand.f][b];
      } else {
        WLp += gP * H[nC + b];
        WLn += gN * H[b];
      }
    }
    // exp(-alpha y h): right side h = s, left side h = -s.
    const fRp = Math.exp(-alpha * s);
    const fRn = Math.exp(alpha * s);
    const fLp = fRn;
    const fLn = fRp;
    const Zraw = WRp * fRp + WRn * fRn + WLp * fLp + WLn * fLn;
    const Z = Zraw / Wtot;
    if (!(Z > 0) || !Number.isFinite(Z)) throw new TrainingError('overflow', `Z_t is ${Z} at round ${t}: weights overflowed`);
    trainLoss *= Z;

    const smallRight = nRight <= n - nRight;
    const fBigP = smallRight ? fLp : fRp;
    const fBigN = smallRight ? fLn : fRn;
    const ratioP = (smallRight ? fRp : fLp) / fBigP;
    const ratioN = (smallRight ? fRn : fLn) / fBigN;
    // Renormalise through the scales: after the update the true weights sum to 1.
    gP = (gP * fBigP) / Zraw;
    gN = (gN * fBigN) / Zraw;

    // --- Scan the chosen column once: update F on training rows, count errors, collect the small side.
    // alpha h by code: h = s on the right side, -s on the left (hv by the feature's codes, hvJ by its unit's codes).
    const hv = new Float64Array(nC);
    for (let b = 0; b < nC; b++) hv[b] = side[b] ? alpha * s : -alpha * s;
    const cu = unitOf[cand.f];
    const J = unitN[cu];
    const dec = decode[cand.f];
    for (let j = 0; j < J; j++) {
      const b = dec ? dec[j] : j;
      isSmall[j] = (side[b] === 1) === smallRight ? 1 : 0;
      hvJ[j] = hv[b];
    }
    // Each thread scans its row segment and rescales that segment's small side.
    params[0] = cu;
    params[1] = ratioN;
    params[2] = ratioP;
    exec?.begin('scan');
    runScan(0, unitCodes, hvJ, isSmall, Ft, w, idx, delta, nNeg, segs, segCounts, params);
    exec?.end();
    let errors = 0;
    for (let k = 0; k < T; k++) errors += segCounts[3 * k + 2];

    // --- Weight update of the small side and the exact histogram correction.
    if (opts.histogramUpdate === 'rebuild' || t % opts.rebuildEvery === 0) {
      absorbScales();
      rebuild();
    } else {
      exec?.begin('update');
      runUnits(2, local, unitCodes, hist, unitN, w, idx, delta, nNeg, n, segs, segCounts);
      exec?.end();
    }
    if (!Number.isFinite(gP) || !Number.isFinite(gN) || !(gP > 0) || !(gN > 0)) {
      throw new TrainingError('overflow', `Class weight scales overflowed at round ${t}; try shrinkage < 1`);
    }

    // --- Validation.
    let vLoss: number | null = null;
    let vErr: number | null = null;
    if (vCodes && vLabels) {
      const vcol = vCodes[cand.f];
      let sum = 0;
      let e = 0;
      for (let i = 0; i < nv; i++) {
        const v = Fv[i] + hv[vcol[i]];
        Fv[i] = v;
        const y = vLabels[i];
        sum += (y === 1 ? cP : cN) * Math.exp(-y * v);
        if (y === 1 ? v <= 0 : v > 0) e++;
      }
      vLoss = sum / vWeightTotal;
      vErr = e / nv;
    }

    chosen.push(cand);
    alphas.push(alpha);
    trace.push({
      round: t,
      featureIndex: cand.f,
      ...describe(binning, cand),
      polarity: s,
      edge: r,
      weightedError: eps,
      alpha,
      Z,
      trainLoss,
      trainError: errors / n,
      validationLoss: vLoss,
      validationError: vErr,
    });

    if (vLoss !== null && vLoss < bestVal - (opts.earlyStopping?.minDelta ?? 0)) {
      bestVal = vLoss;
      bestRound = t;
    }
    if (vLoss === null) bestRound = t;
    hooks?.onRound?.(trace[trace.length - 1]);
    if (eps <= EPS_CLIP) {
      // A perfect split: every row is on its correct side, further rounds would repeat it.
      stoppedBy = 'perfect-split';
      break;
    }
    if (opts.earlyStopping && t - bestRound >= opts.earlyStopping.patience) {
      stoppedBy = 'early-stopping';
      break;
    }
    if (hooks?.shouldStop?.()) break;
  }
  if (!opts.earlyStopping) bestRound = chosen.length;
  return { chosen, alphas, trace, bestRound, stoppedBy, counts };
}

function buildModel(
  binning: Binning,
  features: FeatureSpec[],
  core: BoostResult,
  opts: TrainOptions,
  sizes: { nTrain: number; nTrainPositive: number; nValidation: number; nValidationPositive: number },
): Model {
  const keep = core.bestRound;
  const n = sizes.nTrain;
  const featureMeans = new Array<number>(features.length).fill(0);
  const stumps: Stump[] = [];
  for (let t = 0; t < keep; t++) {
    const c = core.chosen[t];
    const alpha = core.alphas[t];
    const side = sideTable(binning, c);
    const cnt = core.counts[c.f];
    let nRight = 0;
    for (let b = 0; b < cnt.length; b++) if (side[b]) nRight += cnt[b];
    // E[h_t] over training rows = s (n_right - n_left) / n; E[g_f] = sum over f's stumps of alpha_t E[h_t].
    featureMeans[c.f] += (alpha * c.polarity * (2 * nRight - n)) / n;
    const d = describe(binning, c);
    if (d.kind === 'numeric') {
      stumps.push({
        kind: 'numeric',
        feature: d.feature,
        featureIndex: c.f,
        cut: c.k,
        threshold: d.threshold,
        missingRight: c.missingRight,
        polarity: c.polarity,
        alpha,
      });
    } else {
      stumps.push({
        kind: 'categorical',
        feature: d.feature,
        featureIndex: c.f,
        code: c.k,
        match: d.match,
        category: d.category,
        polarity: c.polarity,
        alpha,
      });
    }
  }
  const last = keep > 0 ? core.trace[keep - 1] : null;
  return {
    format: MODEL_FORMAT,
    schemaVersion: MODEL_SCHEMA_VERSION,
    features: features.map((f) => ({ name: f.name, kind: f.kind })),
    binning,
    stumps,
    calibration: null,
    baseline: { expectedF: featureMeans.reduce((a, b) => a + b, 0), featureMeans },
    training: {
      roundsRun: core.trace.length,
      bestRound: keep,
      stoppedBy: core.stoppedBy,
      options: opts,
      ...sizes,
      trainLoss: last ? last.trainLoss : 1,
      trainError: last ? last.trainError : sizes.nTrainPositive / n,
      validationLoss: last ? last.validationLoss : null,
      validationError: last ? last.validationError : null,
    },
  };
}
