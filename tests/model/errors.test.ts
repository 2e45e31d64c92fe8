/** One test per error path of the engine. */
import { describe, expect, it } from 'vitest';
import {
  ModelFormatError,
  OptionsError,
  parseModel,
  scoreRow,
  serializeModel,
  trainModel,
  TrainingError,
  type TrainOptionsInput,
} from '../../shared/src/model';

const tiny = () => ({
  features: [{ name: 'x', kind: 'numeric' as const }],
  columns: { x: Float64Array.from([1, 2, 3, 4, 5, 6]) },
  labels: Int8Array.from([-1, -1, -1, 1, 1, 1]),
});

describe('bad options', () => {
  const bad: [string, unknown][] = [
    ['rounds 0', { rounds: 0 }],
    ['shrinkage above 1', { shrinkage: 1.5 }],
    ['negative class weight', { classWeights: { positive: -1 } }],
    ['unknown option', { depth: 3 }],
  ];
  for (const [name, o] of bad) {
    it(`rejects ${name} with OptionsError naming the path`, () => {
      const e = (() => {
        try {
          trainModel(tiny(), o as TrainOptionsInput);
        } catch (err) {
          return err;
        }
      })();
      expect(e).toBeInstanceOf(OptionsError);
      expect((e as OptionsError).issues.length).toBeGreaterThan(0);
    });
  }
  it('early stopping without a validation set is refused', () => {
    expect(() => trainModel(tiny(), { earlyStopping: { patience: 3 } })).toThrow(/validation/);
  });
});

describe('bad training data', () => {
  it('one class only', () => {
    const d = tiny();
    d.labels.fill(-1);
    expect(() => trainModel(d)).toThrow(TrainingError);
    expect(() => trainModel(d)).toThrow(/one class only \(0 fraud, 6 legitimate/);
  });
  it('a label other than +1/-1, naming the row', () => {
    const d = tiny();
    d.labels[2] = 0;
    expect(() => trainModel(d)).toThrow(/row 3 is 0/);
  });
  it('no stump beats chance', () => {
    // Every stump on x splits {+,-} pairs evenly: every edge is exactly 0.
    const d = { features: [{ name: 'x', kind: 'numeric' as const }], columns: { x: Float64Array.from([0, 0, 1, 1]) }, labels: Int8Array.from([1, -1, 1, -1]) };
    expect(() => trainModel(d)).toThrow(/No stump beats chance/);
  });
  it('every feature constant', () => {
    const d = tiny();
    d.columns.x.fill(2);
    expect(() => trainModel(d)).toThrow(/constant/);
  });
  it('weights overflow', () => {
    // Start weights so large that their total overflows to Infinity.
    expect(() => trainModel(tiny(), { classWeights: { positive: 1e308, negative: 1e308 } })).toThrow(/overflow/);
  });
  it('a column of the wrong type', () => {
    const d = { ...tiny(), columns: { x: ['a', 'b', 'c', 'd', 'e', 'f'] } };
    expect(() => trainModel(d)).toThrow(/must be a Float64Array/);
  });
});

describe('model files', () => {
  // Not separable (row 3 is fraud among legitimate neighbours), so two rounds run.
  const noisy = { ...tiny(), labels: Int8Array.from([-1, -1, 1, -1, 1, 1]) };
  const good = JSON.parse(serializeModel(trainModel(noisy, { rounds: 2, exact: true }).model));
  it('accepts its own output; a separable set stops after the perfect split', () => {
    expect(parseModel(good).stumps).toHaveLength(2);
    expect(trainModel(tiny(), { rounds: 5 }).model.training.stoppedBy).toBe('perfect-split');
  });
  it('not JSON', () => {
    expect(() => parseModel('{oops')).toThrow(ModelFormatError);
    expect(() => parseModel('{oops')).toThrow(/not valid JSON/);
  });
  it('a foreign file', () => {
    expect(() => parseModel({ learner: 'gbdt', trees: [] })).toThrow(/Not an Edgecase scoring model/);
  });
  it('an unknown schema version', () => {
    expect(() => parseModel({ ...good, schemaVersion: 99 })).toThrow(/Unsupported model schema version 99/);
  });
  it('a tampered stump threshold', () => {
    const bad = structuredClone(good);
    bad.stumps[0].threshold += 1;
    expect(() => parseModel(bad)).toThrow(/threshold does not match the bins/);
  });
});

describe('bad rows at scoring time', () => {
  it('text in a numeric feature', () => {
    const { model } = trainModel(tiny(), { rounds: 2 });
    expect(() => scoreRow(model, { x: 'lots' })).toThrow(/numeric but the row holds "lots"/);
  });
});
