import { Worker } from 'node:worker_threads';
import { TrainingError, type ModelErrorCode, type TrainResult } from '@shared/model/index';
import type { Trainer } from './train-model-version';
import type { ThreadMessage } from './train-thread';

/** How often the caller's shouldStop is asked while the thread runs (it also is on every round). */
const STOP_POLL_MS = 100;

// An eval'd worker starts as plain CommonJS without the TypeScript loader the
// parent runs under: register tsx first, then load the thread module. The
// bare specifier resolves from the working directory (the repository root, as
// every entry point runs); without tsx the module is imported as it is.
const BOOTSTRAP = `
const { workerData } = require('node:worker_threads');
import('tsx/esm/api')
  .then((tsx) => tsx.register(), () => undefined)
  .then(() => import(workerData.entry))
  .catch((e) => setImmediate(() => { throw e; }));
`;

/**
 * Runs `trainModel` in a worker thread: the data set is copied to the thread
 * once, rounds come back as messages (to `onRound`), and `shouldStop` is
 * relayed to the thread through a shared flag it reads after every round.
 */
export const threadTrainer: Trainer = (data, options, hooks) =>
  new Promise<TrainResult>((resolve, reject) => {
    const stop = new SharedArrayBuffer(4);
    const flag = new Int32Array(stop);
    const worker = new Worker(BOOTSTRAP, {
      eval: true,
      workerData: { entry: new URL('./train-thread.ts', import.meta.url).href, data, options, stop },
    });
    let settled = false;
    const checkStop = () => {
      if (hooks.shouldStop?.()) Atomics.store(flag, 0, 1);
    };
    const poll = setInterval(checkStop, STOP_POLL_MS);
    const finish = (fn: () => void) => {
      if (settled) return;
      settled = true;
      clearInterval(poll);
      fn();
      void worker.terminate();
    };
    worker.on('message', (m: ThreadMessage) => {
      if (m.type === 'round') {
        hooks.onRound?.(m.round);
        checkStop();
      } else if (m.type === 'done') {
        finish(() => resolve(m.result));
      } else {
        // Engine errors keep their code (one class only, no edge, bad options...): the run shows the engine's own words.
        finish(() => reject(m.code !== null ? new TrainingError(m.code as ModelErrorCode, m.message) : new Error(m.message)));
      }
    });
    worker.on('error', (err) => finish(() => reject(err)));
    worker.on('exit', (code) => finish(() => reject(new Error(`The training thread stopped (exit code ${code}) before it finished`))));
  });
