/**
 * Early stopping on a validation set keeps the best round. Data: the
 * breast-cancer set (UCI; Street, Wolberg & Mangasarian 1993), even rows to
 * train, odd rows to validate.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { scoreBatch, trainModel, type TrainResult } from '../../shared/src/model';
import { breastCancerSet } from './helpers/data';
import { breastCancerData } from './helpers/python';

let fit: TrainResult;
let val: { columns: ReturnType<typeof breastCancerSet>['columns']; labels: Int8Array };
const PATIENCE = 15;

beforeAll(() => {
  const bc = breastCancerSet(breastCancerData());
  const pick = (parity: number) => {
    const idx = Array.from({ length: bc.labels.length }, (_, i) => i).filter((i) => i % 2 === parity);
    const columns: typeof bc.columns = {};
    for (const [k, c] of Object.entries(bc.columns)) columns[k] = Float64Array.from(idx, (i) => (c as Float64Array)[i]);
    return { columns, labels: Int8Array.from(idx, (i) => bc.labels[i]) };
  };
  val = pick(1);
  fit = trainModel({ features: bc.features, ...pick(0), validation: val }, { rounds: 400, exact: true, earlyStopping: { patience: PATIENCE } });
}, 120_000);

describe('early stopping', () => {
  it('stops once the validation loss has not improved for `patience` rounds', () => {
    expect(fit.model.training.stoppedBy).toBe('early-stopping');
    expect(fit.trace.length - fit.model.training.bestRound).toBe(PATIENCE);
  });

  it('keeps the round with the lowest validation loss', () => {
    const losses = fit.trace.map((r) => r.validationLoss!);
    const best = fit.model.training.bestRound;
    expect(losses[best - 1]).toBe(Math.min(...losses));
    expect(fit.model.stumps).toHaveLength(best);
  });

  it('the traced validation loss is the exponential loss of the kept model on the validation rows', () => {
    const s = scoreBatch(fit.model, val.columns);
    let loss = 0;
    s.margin.forEach((F, i) => (loss += Math.exp(-val.labels[i] * F) / val.labels.length));
    expect(Math.abs(loss - fit.trace[fit.model.training.bestRound - 1].validationLoss!)).toBeLessThan(1e-10);
  });
});
