/**
 * The per-round hooks of trainModel: `onRound` sees every recorded round in
 * order, `shouldStop` ends training with the rounds so far, and a stopped run
 * is the prefix of the run it interrupted (boosting is greedy, so the first k
 * rounds do not depend on how many follow). Data: an invented, seeded set
 * (fixture only) with a numeric and a categorical signal and some noise.
 */
import { describe, expect, it } from 'vitest';
import { trainModel, type RoundTrace, type TrainingData } from '../../shared/src/model';

function fixture(n: number, seed: number): TrainingData {
  let s = seed >>> 0;
  const rand = () => {
    // mulberry32
    s = (s + 0x6d2b79f5) >>> 0;
    let t = s;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  const amount = new Float64Array(n);
  const velocity = new Float64Array(n);
  const channel: (string | null)[] = [];
  const labels = new Int8Array(n);
  const channels = ['pos', 'ecommerce', 'atm'];
  for (let i = 0; i < n; i++) {
    amount[i] = Math.round(rand() * 2000);
    velocity[i] = rand() < 0.05 ? NaN : Math.floor(rand() * 10);
    channel.push(channels[Math.floor(rand() * 3)]);
    const risk = (amount[i] > 1500 ? 1 : 0) + (channel[i] === 'ecommerce' ? 0.6 : 0) + (velocity[i] > 7 ? 0.8 : 0);
    labels[i] = rand() < 0.1 + 0.3 * risk ? 1 : -1;
  }
  return {
    features: [
      { name: 'amount', kind: 'numeric' },
      { name: 'velocity', kind: 'numeric' },
      { name: 'channel', kind: 'categorical' },
    ],
    columns: { amount, velocity, channel },
    labels,
  };
}

const data = fixture(3000, 7);
const validation = fixture(1000, 11);

describe('trainModel hooks', () => {
  it('onRound sees every round, in order, with the entry the trace records', () => {
    const seen: RoundTrace[] = [];
    const fit = trainModel({ ...data, validation }, { rounds: 40, shrinkage: 0.5 }, { onRound: (t) => seen.push(t) });
    expect(fit.trace).toHaveLength(40);
    expect(seen).toHaveLength(fit.trace.length);
    seen.forEach((t, i) => {
      expect(t.round).toBe(i + 1);
      expect(t).toBe(fit.trace[i]);
    });
    // The validation loss reaches the hook too: that is what the progress view plots.
    expect(seen.every((t) => typeof t.validationLoss === 'number')).toBe(true);
  });

  it('hooks do not change what is trained', () => {
    const plain = trainModel(data, { rounds: 25 });
    const hooked = trainModel(data, { rounds: 25 }, { onRound: () => undefined, shouldStop: () => false });
    expect(hooked.model).toEqual(plain.model);
  });

  it('shouldStop ends training after the round it answers true, keeping the rounds so far', () => {
    const full = trainModel(data, { rounds: 30 });
    let calls = 0;
    const stopped = trainModel(data, { rounds: 30 }, { shouldStop: () => ++calls >= 7 });
    expect(calls).toBe(7);
    expect(stopped.trace).toHaveLength(7);
    expect(stopped.model.stumps).toHaveLength(7);
    expect(stopped.model.training.roundsRun).toBe(7);
    expect(stopped.model.training.bestRound).toBe(7);
    // Greedy boosting: the first 7 rounds are those of the uninterrupted run.
    expect(stopped.model.stumps).toEqual(full.model.stumps.slice(0, 7));
    expect(stopped.trace).toEqual(full.trace.slice(0, 7));
  });

  it('with early stopping on, a stop keeps the best validation round seen so far', () => {
    const onRound: RoundTrace[] = [];
    const stopped = trainModel(
      { ...data, validation },
      { rounds: 200, shrinkage: 0.5, earlyStopping: { patience: 50 } },
      { onRound: (t) => onRound.push(t), shouldStop: () => onRound.length >= 12 },
    );
    expect(stopped.trace).toHaveLength(12);
    const losses = stopped.trace.map((t) => t.validationLoss!);
    const best = losses.indexOf(Math.min(...losses)) + 1;
    expect(stopped.model.training.bestRound).toBe(best);
    expect(stopped.model.stumps).toHaveLength(best);
  });
});
