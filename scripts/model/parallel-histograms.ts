/**
 * A HistogramExecutor on Node worker_threads: features are dealt round-robin
 * to `threads` threads (the calling thread keeps every threads-th one), all
 * arrays live in SharedArrayBuffers, and each round is one Atomics
 * notify/wait hand-off. Each feature's histogram is computed by one thread
 * with the same kernels, so training is identical to single-threaded.
 *
 * Node only (the engine itself stays free of node: imports).
 */
import { Worker, type MessagePort } from 'node:worker_threads';
import { addSmallSide, buildHistogram, type HistogramExecutor, type HistogramState } from '../../shared/src/model/kernels';
import type { CodeArray } from '../../shared/src/model/types';

/** Control block slots. */
const SEQ = 0;
const TASK = 1;
const M = 2;
const MNEG = 3;
const DONE = 4;
export const TASK_REBUILD = 1;
export const TASK_UPDATE = 2;
export const TASK_STOP = 3;

interface AttachMessage {
  slot: number;
  ctrl: SharedArrayBuffer;
  features: number[];
  codes: { buffer: SharedArrayBuffer; bytes: number }[];
  hist: SharedArrayBuffer[];
  nCodes: number[];
  w: SharedArrayBuffer;
  idx: SharedArrayBuffer;
  delta: SharedArrayBuffer;
  nNeg: number;
  n: number;
  stride: number;
}

/**
 * The worker's main loop. It runs from its own source text (see WORKER_SOURCE),
 * so it must not refer to anything outside its parameters.
 */
function workerMain(port: MessagePort, build: typeof buildHistogram, update: typeof addSmallSide): void {
  port.once('message', (a: AttachMessage) => {
    const ctrl = new Int32Array(a.ctrl);
    const codes: CodeArray[] = [];
    for (const c of a.codes) codes.push(c.bytes === 1 ? new Uint8Array(c.buffer) : c.bytes === 2 ? new Uint16Array(c.buffer) : new Uint32Array(c.buffer));
    const hist: Float64Array[] = [];
    for (const b of a.hist) hist.push(new Float64Array(b));
    const w = new Float64Array(a.w);
    const idx = new Int32Array(a.idx);
    const delta = new Float64Array(a.delta);
    const tmp = new Float64Array(4 * a.stride);
    let seen = 0;
    try {
      for (;;) {
        Atomics.wait(ctrl, 0, seen);
        const seq = Atomics.load(ctrl, 0);
        if (seq === seen) continue;
        const task = ctrl[1];
        if (task === 3) break;
        const m = ctrl[2];
        const mNeg = ctrl[3];
        for (const f of a.features) {
          if (task === 1) build(codes[f], w, a.nNeg, a.n, hist[f], a.nCodes[f], tmp, a.stride);
          else update(hist[f], codes[f], idx, delta, m, mNeg, a.nCodes[f], tmp, a.stride);
        }
        seen = seq;
        Atomics.store(ctrl, a.slot, seq);
        Atomics.notify(ctrl, a.slot);
      }
    } catch (e) {
      Atomics.store(ctrl, a.slot, -1);
      Atomics.notify(ctrl, a.slot);
      throw e;
    }
  });
}

/**
 * The worker as a CommonJS script built from the very functions the calling
 * thread runs (their compiled source text), so no TypeScript loader is needed
 * in the worker and the kernels exist once. `__name` is the helper some
 * transpilers insert to keep function names.
 */
const WORKER_SOURCE = `var __name = (f) => f;
(${workerMain.toString()})(require('node:worker_threads').parentPort, ${buildHistogram.toString()}, ${addSmallSide.toString()});`;

export function createWorkerHistograms(threads: number): HistogramExecutor {
  if (!(Number.isInteger(threads) && threads >= 2)) throw new RangeError('createWorkerHistograms needs threads >= 2');
  const nWorkers = threads - 1;
  let ctrl: Int32Array | null = null;
  let workers: Worker[] = [];
  let seq = 0;
  return {
    allocate: (bytes) => new SharedArrayBuffer(bytes),
    attach(state: HistogramState): number[] {
      ctrl = new Int32Array(new SharedArrayBuffer(4 * (DONE + nWorkers)));
      const F = state.codes.length;
      const share = (k: number) => Array.from({ length: F }, (_, f) => f).filter((f) => f % threads === k);
      workers = Array.from({ length: nWorkers }, (_, k) => {
        const worker = new Worker(WORKER_SOURCE, { eval: true });
        worker.postMessage({
          slot: DONE + k,
          ctrl: ctrl!.buffer,
          features: share(k + 1),
          codes: state.codes.map((c) => ({ buffer: c.buffer, bytes: c.BYTES_PER_ELEMENT })),
          hist: state.hist.map((h) => h.buffer),
          nCodes: state.nCodes,
          w: state.w.buffer,
          idx: state.idx.buffer,
          delta: state.delta.buffer,
          nNeg: state.nNeg,
          n: state.n,
          stride: state.stride,
        });
        return worker;
      });
      return share(0);
    },
    begin(task, m, mNeg) {
      const c = ctrl!;
      c[TASK] = task === 'rebuild' ? TASK_REBUILD : TASK_UPDATE;
      c[M] = m;
      c[MNEG] = mNeg;
      seq++;
      Atomics.store(c, SEQ, seq);
      Atomics.notify(c, SEQ);
    },
    end() {
      const c = ctrl!;
      for (let k = 0; k < nWorkers; k++) {
        for (;;) {
          const v = Atomics.load(c, DONE + k);
          if (v === seq) break;
          if (v < 0) throw new Error('A histogram worker failed (see its stderr)');
          Atomics.wait(c, DONE + k, v, 30_000);
        }
      }
    },
    detach() {
      if (!ctrl) return;
      ctrl[TASK] = TASK_STOP;
      Atomics.store(ctrl, SEQ, ++seq);
      Atomics.notify(ctrl, SEQ);
      for (const w of workers) void w.terminate();
      workers = [];
      ctrl = null;
    },
  };
}
