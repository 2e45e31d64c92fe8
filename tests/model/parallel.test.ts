/**
 * Training with histogram work split over worker threads is identical to
 * single-threaded training: each feature's histogram is built by one thread
 * with the same kernels (a consistency check between two execution paths).
 */
import { describe, expect, it } from 'vitest';
import { trainModel } from '../../shared/src/model';
import { createWorkerHistograms } from '../../scripts/model/parallel-histograms';
import { syntheticFraudSet } from '../../scripts/model/synthetic';

describe('worker-thread histograms', () => {
  it('give exactly the same trace and model as one thread', () => {
    const d = syntheticFraudSet(20_000, 3);
    const one = trainModel(d, { rounds: 60, rebuildEvery: 7 });
    const two = trainModel(d, { rounds: 60, rebuildEvery: 7 }, { histograms: createWorkerHistograms(2) });
    const three = trainModel(d, { rounds: 60, rebuildEvery: 7 }, { histograms: createWorkerHistograms(3) });
    expect(two.trace).toEqual(one.trace);
    expect(three.model.stumps).toEqual(one.model.stumps);
  }, 60_000);

  it('rejects fewer than two threads', () => {
    expect(() => createWorkerHistograms(1)).toThrow(/threads >= 2/);
  });
});
