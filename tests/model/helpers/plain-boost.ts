/**
 * A deliberately plain AdaBoost-over-stumps reference for the fast trainer:
 * margins m_i kept explicitly, weights d_i = d0_i exp(-m_i) / sum recomputed
 * from scratch every round, histograms rebuilt from every row every round,
 * no class grouping, no scales, no incremental updates. Same dictionary and
 * tie-break as the engine (see shared/src/model/train.ts).
 */
import { applyBinning, codeCount, fitBinning } from '../../../shared/src/model/binning';
import type { FeatureColumns, FeatureSpec } from '../../../shared/src/model/types';

export interface PlainRound {
  f: number;
  k: number;
  missingRight: boolean;
  polarity: number;
  eps: number;
  alpha: number;
}

export function plainBoost(
  input: { features: FeatureSpec[]; columns: FeatureColumns; labels: Int8Array },
  o: { rounds: number; shrinkage?: number; classWeights?: { positive: number; negative: number }; exact?: boolean; seed?: number },
): PlainRound[] {
  const binning = fitBinning(input.columns, input.features, { exact: o.exact ?? false, seed: o.seed ?? 1 });
  const codes = applyBinning(binning, input.columns);
  const y = input.labels;
  const n = y.length;
  const cw = o.classWeights ?? { positive: 1, negative: 1 };
  const d0 = Float64Array.from(y, (v) => (v === 1 ? cw.positive : cw.negative));
  const m = new Float64Array(n);
  const out: PlainRound[] = [];
  for (let t = 0; t < o.rounds; t++) {
    const d = new Float64Array(n);
    let sum = 0;
    for (let i = 0; i < n; i++) sum += (d[i] = d0[i] * Math.exp(-m[i]));
    for (let i = 0; i < n; i++) d[i] /= sum;
    let best: PlainRound | null = null;
    let bestAbs = -1;
    binning.features.forEach((b, f) => {
      const nC = codeCount(b);
      const H = new Float64Array(nC); // sum of d_i y_i per code
      const cnt = new Int32Array(nC);
      for (let i = 0; i < n; i++) {
        H[codes[f][i]] += d[i] * y[i];
        cnt[codes[f][i]]++;
      }
      const T = H.reduce((a, v) => a + v, 0);
      const tryCut = (k: number, right: (c: number) => boolean, missingRight: boolean) => {
        let S = 0;
        let nR = 0;
        for (let c = 0; c < nC; c++) {
          if (right(c)) {
            S += H[c];
            nR += cnt[c];
          }
        }
        if (nR === 0 || nR === n) return;
        const raw = 2 * S - T;
        if (Math.abs(raw) > bestAbs + 1e-12) {
          bestAbs = Math.abs(raw);
          best = { f, k, missingRight, polarity: raw < 0 ? -1 : 1, eps: (1 - Math.abs(raw)) / 2, alpha: 0 };
        }
      };
      const miss = nC - 1;
      if (b.kind === 'numeric') {
        const K = nC - 2;
        for (let k = 0; k < K; k++) {
          tryCut(k, (c) => c !== miss && c > k, false);
          if (cnt[miss] > 0) tryCut(k, (c) => c === miss || c > k, true);
        }
        if (cnt[miss] > 0) tryCut(K, (c) => c === miss, true);
      } else {
        for (let c0 = 0; c0 < nC; c0++) tryCut(c0, (c) => c === c0, false);
      }
    });
    const b = best as PlainRound | null;
    if (!b) break;
    const eps = Math.min(Math.max(b.eps, 1e-10), 1 - 1e-10);
    b.alpha = (o.shrinkage ?? 1) * 0.5 * Math.log((1 - eps) / eps);
    const bins = binning.features[b.f];
    const miss = codeCount(bins) - 1;
    for (let i = 0; i < n; i++) {
      const c = codes[b.f][i];
      const right = bins.kind === 'numeric' ? (c === miss ? b.missingRight : c > b.k) : c === b.k;
      m[i] += y[i] * b.alpha * (right ? b.polarity : -b.polarity);
    }
    out.push(b);
  }
  return out;
}
