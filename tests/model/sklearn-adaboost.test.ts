/**
 * Round-by-round agreement with scikit-learn's AdaBoostClassifier(algorithm="SAMME")
 * driving a textbook minimum-weighted-error stump (tests/reference/adaboost_stump_reference.py),
 * on the Wisconsin diagnostic breast-cancer data shipped with scikit-learn
 * (UCI; Street, Wolberg & Mangasarian 1993). Both sides train on the same numbers:
 * Python writes them, this test reads them.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { scoreBatch, trainModel, type RoundTrace, type TrainResult } from '../../shared/src/model';
import { breastCancerSet } from './helpers/data';
import { sklearnAdaBoostReference } from './helpers/python';

const ROUNDS = 40;
let ref: ReturnType<typeof sklearnAdaBoostReference>;
let ours: TrainResult;
let set: ReturnType<typeof breastCancerSet>;

beforeAll(() => {
  ref = sklearnAdaBoostReference(ROUNDS);
  set = breastCancerSet(ref.data);
  ours = trainModel(set, { rounds: ROUNDS, exact: true });
}, 120_000);

describe('exact mode vs scikit-learn SAMME with a minimum-error stump (breast cancer)', () => {
  it('runs the same number of rounds', () => {
    expect(ref.reference.rounds).toHaveLength(ROUNDS);
    expect(ours.trace).toHaveLength(ROUNDS);
  });

  it('picks the same stump every round: feature, threshold, polarity', () => {
    ref.reference.rounds.forEach((r, t) => {
      const o: RoundTrace = ours.trace[t];
      expect({ t, feature: o.featureIndex, polarity: o.polarity }).toEqual({ t, feature: r.feature, polarity: r.polarity });
      expect(o.threshold).toBe(r.threshold);
    });
  });

  it('has the same weighted error (1e-9) and estimator weight = 2 alpha (1e-9)', () => {
    ref.reference.rounds.forEach((r, t) => {
      expect(Math.abs(ours.trace[t].weightedError - r.error)).toBeLessThan(1e-9);
      // sklearn SAMME, two classes: estimator weight = ln((1 - err) / err) = 2 alpha.
      expect(Math.abs(2 * ours.trace[t].alpha - r.weight)).toBeLessThan(1e-9);
    });
  });

  it('agrees with decision_function in sign on every row (and in value: it is F / sum alpha)', () => {
    const s = scoreBatch(ours.model, set.columns);
    let disagree = 0;
    ref.reference.decision.forEach((dec, i) => {
      if (Math.sign(dec) !== Math.sign(s.normalizedMargin[i])) disagree++;
      expect(Math.abs(dec - s.normalizedMargin[i])).toBeLessThan(1e-9);
    });
    expect(disagree).toBe(0);
  });
});
