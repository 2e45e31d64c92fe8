/**
 * The boosting loop, run in a worker thread so the training worker's event
 * loop stays free: progress events, lock renewals and cancellation get
 * through while the rounds run. Every round is posted back as it finishes;
 * the stop flag is shared memory the main thread sets, read once per round.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { trainModel, type TrainingData, type TrainOptionsInput } from '@shared/model/index';

export type ThreadMessage =
  | { type: 'round'; round: import('@shared/model/index').RoundTrace }
  | { type: 'done'; result: import('@shared/model/index').TrainResult }
  | { type: 'error'; name: string; code: string | null; message: string };

const input = workerData as { data: TrainingData; options: TrainOptionsInput; stop: SharedArrayBuffer };
const stop = new Int32Array(input.stop);
const port = parentPort!;

try {
  const result = trainModel(input.data, input.options, {
    onRound: (round) => port.postMessage({ type: 'round', round } satisfies ThreadMessage),
    shouldStop: () => Atomics.load(stop, 0) === 1,
  });
  port.postMessage({ type: 'done', result } satisfies ThreadMessage);
} catch (e) {
  const err = e as Error & { code?: unknown };
  port.postMessage({ type: 'error', name: err.name, code: typeof err.code === 'string' ? err.code : null, message: err.message } satisfies ThreadMessage);
}
