/**
 * A HistogramExecutor on Node worker_threads. Histogram units are dealt in
 * groups of four (the kernels' group size), round-robin, to `threads`
 * threads (the calling thread keeps every threads-th group); the scan of the
 * chosen unit is split by rows, thread k taking row segment k. All arrays
 * live in SharedArrayBuffers, and each task is one Atomics notify/wait
 * hand-off. Each histogram is computed by one thread with the same kernels
 * in row order, so training is identical to single-threaded.
 *
 * Node only (the engine itself stays free of node: imports).
 */
import { Worker, type MessagePort } from 'node:worker_threads';
import {
  build1,
  build4,
  rescaleSegment,
  runScan,
  runUnits,
  scanSegment,
  update1,
  update4,
  type HistogramExecutor,
  type HistogramState,
} from '../../shared/src/model/kernels';
import type { CodeArray } from '../../shared/src/model/types';

/** Control block slots. */
const SEQ = 0;
const TASK = 1;
const DONE = 2;
export const TASK_REBUILD = 1;
export const TASK_UPDATE = 2;
export const TASK_SCAN = 3;
export const TASK_STOP = 4;

type Shared = ArrayBufferLike;
interface AttachMessage {
  /** This worker's thread number k (1..threads-1): its row segment and its DONE slot is DONE + k - 1. */
  k: number;
  ctrl: Shared;
  units: number[];
  codes: { buffer: Shared; bytes: number }[];
  hist: Shared[];
  nCodes: number[];
  w: Shared;
  idx: Shared;
  delta: Shared;
  Ft: Shared;
  hv: Shared;
  isSmall: Shared;
  segs: Shared;
  counts: Shared;
  params: Shared;
  nNeg: number;
  n: number;
}

/**
 * The worker's main loop. It runs from its own source text (see WORKER_SOURCE),
 * so it must not refer to anything outside its parameters.
 */
function workerMain(port: MessagePort, units: typeof runUnits, scan: typeof runScan): void {
  port.once('message', (a: AttachMessage) => {
    const ctrl = new Int32Array(a.ctrl);
    const codes: CodeArray[] = [];
    for (const c of a.codes) codes.push(c.bytes === 1 ? new Uint8Array(c.buffer) : c.bytes === 2 ? new Uint16Array(c.buffer) : new Uint32Array(c.buffer));
    const hist: Float64Array[] = [];
    for (const b of a.hist) hist.push(new Float64Array(b));
    const w = new Float64Array(a.w);
    const idx = new Int32Array(a.idx);
    const delta = new Float64Array(a.delta);
    const Ft = new Float64Array(a.Ft);
    const hv = new Float64Array(a.hv);
    const isSmall = new Uint8Array(a.isSmall);
    const segs = new Int32Array(a.segs);
    const counts = new Int32Array(a.counts);
    const params = new Float64Array(a.params);
    const slot = 2 + a.k - 1;
    let seen = 0;
    try {
      for (;;) {
        Atomics.wait(ctrl, 0, seen);
        const seq = Atomics.load(ctrl, 0);
        if (seq === seen) continue;
        const task = ctrl[1];
        if (task === 4) break;
        if (task === 3) scan(a.k, codes, hv, isSmall, Ft, w, idx, delta, a.nNeg, segs, counts, params);
        else units(task, a.units, codes, hist, a.nCodes, w, idx, delta, a.nNeg, a.n, segs, counts);
        seen = seq;
        Atomics.store(ctrl, slot, seq);
        Atomics.notify(ctrl, slot);
      }
    } catch (e) {
      Atomics.store(ctrl, slot, -1);
      Atomics.notify(ctrl, slot);
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
${[build4, build1, update4, update1, scanSegment, rescaleSegment, runUnits, runScan].map((f) => f.toString()).join('\n')}
(${workerMain.toString()})(require('node:worker_threads').parentPort, runUnits, runScan);`;

export function createWorkerHistograms(threads: number): HistogramExecutor {
  if (!(Number.isInteger(threads) && threads >= 2)) throw new RangeError('createWorkerHistograms needs threads >= 2');
  const nWorkers = threads - 1;
  let ctrl: Int32Array | null = null;
  let workers: Worker[] = [];
  let seq = 0;
  return {
    threads,
    allocate: (bytes) => new SharedArrayBuffer(bytes),
    attach(state: HistogramState): number[] {
      ctrl = new Int32Array(new SharedArrayBuffer(4 * (DONE + nWorkers)));
      const U = state.codes.length;
      const share = (k: number) => Array.from({ length: U }, (_, u) => u).filter((u) => Math.floor(u / 4) % threads === k);
      workers = Array.from({ length: nWorkers }, (_, i) => {
        const worker = new Worker(WORKER_SOURCE, { eval: true });
        const message: AttachMessage = {
          k: i + 1,
          ctrl: ctrl!.buffer,
          units: share(i + 1),
          codes: state.codes.map((c) => ({ buffer: c.buffer, bytes: c.BYTES_PER_ELEMENT })),
          hist: state.hist.map((h) => h.buffer),
          nCodes: state.nCodes,
          w: state.w.buffer,
          idx: state.idx.buffer,
          delta: state.delta.buffer,
          Ft: state.Ft.buffer,
          hv: state.hv.buffer,
          isSmall: state.isSmall.buffer,
          segs: state.segs.buffer,
          counts: state.counts.buffer,
          params: state.params.buffer,
          nNeg: state.nNeg,
          n: state.n,
        };
        worker.postMessage(message);
        return worker;
      });
      return share(0);
    },
    begin(task) {
      const c = ctrl!;
      c[TASK] = task === 'rebuild' ? TASK_REBUILD : task === 'update' ? TASK_UPDATE : TASK_SCAN;
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
