/**
 * Training benchmark: `npm run bench -- train [--rows 1000000] [--rounds 200] [--threads 1]
 *   [--repeat 3] [--sklearn-rows 100000] [--sklearn-full-rounds 10] [--test-rows 200000] [--skip-xgboost] [--skip-sklearn]`.
 *
 * One seeded synthetic fraud-like set (scripts/model/synthetic.ts: log-normal amounts,
 * hour of day, MCC-like and country-like categoricals, velocity counts, missing values;
 * about 1% fraud) is written once as raw binaries to a temp dir, and each contender
 * trains on the very same numbers in its own child process:
 *   ours      this engine, quantile bins: one thread, and with --threads N > 1 also N threads
 *             (worker_threads: histogram units and row segments split over threads);
 *   xgboost   python3-xgboost, tree_method=hist, max_depth=1, same rounds: nthread 1, and N with --threads N;
 *   sklearn   AdaBoostClassifier(SAMME) over depth-1 trees on the first --sklearn-rows rows
 *             (slow), compared pair by pair with ours on the same subset; and on all rows for
 *             --sklearn-full-rounds rounds (default 10; its rounds all cost the same), compared per
 *             round with ours on all rows.
 * Categoricals reach the Python side as integer codes (ordinal), ours reads them as categories.
 * ms/round is the steady-state time between the first and the last round (ours: onRound
 * timestamps; XGBoost: an after_iteration callback; scikit-learn has no per-round hook, so
 * fit time / rounds); fit s is end to end, binning or quantile sketching included.
 * Figures are medians over --repeat runs. Peak memory is the rise of the resident set
 * during fitting (VmHWM after /proc/self/clear_refs), not the data already loaded.
 * Figures, not a timed test: the CPU of this machine is shared.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { parseArgs } from 'node:util';
import { applyBinning, compileModel, fitBinning, rocAuc, trainModel } from '../../shared/src/model';
import type { FeatureColumns, FeatureSpec } from '../../shared/src/model/types';
import { createWorkerHistograms } from '../../scripts/model/parallel-histograms';
import { syntheticFraudSet } from '../../scripts/model/synthetic';

const ROOT = resolve(import.meta.dirname, '../..');
const PYTHON = '/usr/bin/python3';

interface Meta {
  features: number;
  train_rows: number;
  test_rows: number;
  specs: FeatureSpec[];
  /** Category labels by feature index (categorical features only). */
  categories: Record<number, string[]>;
}

interface Figures {
  which: string;
  rows: number;
  rounds: number;
  threads: number;
  fit_s: number;
  ms_per_round: number;
  peak_mb: number;
  auc: number;
  score_rows_per_s: number;
  binning_s?: number;
  cpu_ms_per_round?: number;
}

function writeSet(dir: string, split: 'train' | 'test', d: ReturnType<typeof syntheticFraudSet>, meta: Meta): void {
  const n = d.labels.length;
  const X = new Float64Array(meta.features * n);
  meta.specs.forEach((s, f) => {
    const col = d.columns[s.name];
    if (s.kind === 'numeric') X.set(col as Float64Array, f * n);
    else {
      const index = new Map(meta.categories[f].map((c, i) => [c, i]));
      const cat = col as (string | null)[];
      for (let i = 0; i < n; i++) X[f * n + i] = cat[i] === null ? NaN : index.get(cat[i]!)!;
    }
  });
  writeFileSync(join(dir, `X_${split}.f64`), X);
  writeFileSync(join(dir, `y_${split}.i8`), Int8Array.from(d.labels, (y) => (y === 1 ? 1 : 0)));
}

function readSet(dir: string, split: 'train' | 'test', meta: Meta, rows: number): { columns: FeatureColumns; labels: Int8Array } {
  const total = split === 'train' ? meta.train_rows : meta.test_rows;
  const buf = readFileSync(join(dir, `X_${split}.f64`));
  const all = new Float64Array(buf.buffer.slice(buf.byteOffset, buf.byteOffset + buf.byteLength));
  const columns: FeatureColumns = {};
  meta.specs.forEach((s, f) => {
    const col = Float64Array.from(all.subarray(f * total, f * total + rows));
    columns[s.name] = s.kind === 'numeric' ? col : Array.from(col, (v) => (Number.isNaN(v) ? null : meta.categories[f][v]));
  });
  const y = readFileSync(join(dir, `y_${split}.i8`));
  return { columns, labels: Int8Array.from(y.subarray(0, rows), (v) => (v === 1 ? 1 : -1)) };
}

function statusKb(field: string): number {
  const m = readFileSync('/proc/self/status', 'utf8').match(new RegExp(`^${field}:\\s+(\\d+)`, 'm'));
  return m ? Number(m[1]) : 0;
}

function resetPeak(): number {
  try {
    writeFileSync('/proc/self/clear_refs', '5');
  } catch {
    // not Linux: the peak then includes the loaded data
  }
  return statusKb('VmRSS');
}

/** Child: train ours on the first `rows` training rows and print figures as one JSON line. */
function childOurs(dir: string, rounds: number, rows: number, threads: number): void {
  const meta = JSON.parse(readFileSync(join(dir, 'meta.json'), 'utf8')) as Meta;
  const train = readSet(dir, 'train', meta, rows);
  const test = readSet(dir, 'test', meta, meta.test_rows);
  // Binning alone (the trainer bins again inside, included in fit_s).
  let t0 = performance.now();
  const binning = fitBinning(train.columns, meta.specs);
  applyBinning(binning, train.columns);
  const binningS = (performance.now() - t0) / 1000;
  const base = resetPeak();
  t0 = performance.now();
  // Steady-state round time from the round timestamps (binning and set-up excluded).
  const stamps: number[] = [];
  const cpuStamps: number[] = [];
  const hooks = {
    onRound: () => {
      stamps.push(performance.now());
      const u = process.cpuUsage();
      cpuStamps.push((u.user + u.system) / 1000);
    },
    ...(threads > 1 ? { histograms: createWorkerHistograms(threads) } : {}),
  };
  const { model, trace } = trainModel({ features: meta.specs, ...train }, { rounds }, hooks);
  const fitS = (performance.now() - t0) / 1000;
  const peakMb = (statusKb('VmHWM') - base) / 1024;
  const compiled = compileModel(model);
  let best = Infinity;
  let F: Float64Array = new Float64Array(0);
  for (let r = 0; r < 5; r++) {
    const s0 = performance.now();
    F = compiled.scoreColumns(test.columns);
    best = Math.min(best, performance.now() - s0);
  }
  const out: Figures = {
    which: 'ours',
    rows,
    rounds: trace.length,
    threads,
    fit_s: fitS,
    ms_per_round: stamps.length > 1 ? (stamps[stamps.length - 1] - stamps[0]) / (stamps.length - 1) : (fitS * 1000) / trace.length,
    // CPU of the whole process (all threads) between the first and the last round.
    cpu_ms_per_round: cpuStamps.length > 1 ? (cpuStamps[cpuStamps.length - 1] - cpuStamps[0]) / (cpuStamps.length - 1) : NaN,
    peak_mb: peakMb,
    auc: rocAuc(F, test.labels),
    score_rows_per_s: test.labels.length / (best / 1000),
    binning_s: binningS,
  };
  console.log(JSON.stringify(out));
}

function runChild(cmd: string, args: string[]): Figures {
  const r = spawnSync(cmd, args, { cwd: ROOT, encoding: 'utf8', maxBuffer: 1 << 24 });
  if (r.status !== 0) throw new Error(`${cmd} ${args.join(' ')} failed:\n${r.stderr}`);
  const line = r.stdout.trim().split('\n').at(-1)!;
  return JSON.parse(line) as Figures;
}

const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
};

function medianFigures(runs: Figures[]): Figures {
  const keys = ['fit_s', 'ms_per_round', 'peak_mb', 'auc', 'score_rows_per_s', 'binning_s', 'cpu_ms_per_round'] as const;
  const out = { ...runs[0] };
  for (const k of keys) if (runs[0][k] !== undefined) (out as Record<string, unknown>)[k] = median(runs.map((r) => r[k] as number));
  return out;
}

const fmt = (x: number | undefined, d = 2) => (x === undefined || !Number.isFinite(x) ? '-' : x.toFixed(d));
const fmtInt = (x: number) => Math.round(x).toLocaleString('en-US');

export async function run(argv: string[]): Promise<void> {
  const { values } = parseArgs({
    args: argv,
    options: {
      rows: { type: 'string', default: '1000000' },
      rounds: { type: 'string', default: '200' },
      threads: { type: 'string', default: '1' },
      repeat: { type: 'string', default: '3' },
      'sklearn-rows': { type: 'string', default: '100000' },
      'sklearn-full-rounds': { type: 'string', default: '10' },
      'test-rows': { type: 'string', default: '200000' },
      'skip-xgboost': { type: 'boolean', default: false },
      'skip-sklearn': { type: 'boolean', default: false },
      seed: { type: 'string', default: '42' },
      child: { type: 'string' },
      dir: { type: 'string' },
      'train-rows': { type: 'string' },
      // threads: XGBoost's nthread, and ours with worker_threads when > 1
    },
    strict: true,
  });
  const rounds = Number(values.rounds);
  if (values.child === 'ours') {
    childOurs(values.dir!, rounds, Number(values['train-rows']), Number(values.threads));
    return;
  }
  const rows = Number(values.rows);
  const testRows = Number(values['test-rows']);
  const threads = Number(values.threads);
  const repeat = Number(values.repeat);
  const skRows = Math.min(rows, Number(values['sklearn-rows']));
  const seed = Number(values.seed);

  const dir = mkdtempSync(join(tmpdir(), 'edgecase-bench-'));
  try {
    console.log(`Generating ${fmtInt(rows)} training + ${fmtInt(testRows)} held-out rows (seed ${seed}) ...`);
    const train = syntheticFraudSet(rows, seed);
    const test = syntheticFraudSet(testRows, seed + 1);
    const specs = train.features;
    const categories: Record<number, string[]> = {};
    specs.forEach((s, f) => {
      if (s.kind !== 'categorical') return;
      const seen = new Set<string>();
      for (const d of [train, test]) for (const v of d.columns[s.name] as (string | null)[]) if (v !== null) seen.add(v);
      categories[f] = [...seen].sort();
    });
    const meta: Meta = { features: specs.length, train_rows: rows, test_rows: testRows, specs, categories };
    writeFileSync(join(dir, 'meta.json'), JSON.stringify(meta));
    writeSet(dir, 'train', train, meta);
    writeSet(dir, 'test', test, meta);
    const fraud = train.labels.reduce((a, y) => a + (y === 1 ? 1 : 0), 0);
    console.log(`${specs.length} features, ${((100 * fraud) / rows).toFixed(2)}% fraud; ${rounds} rounds; ${threads} thread(s) for XGBoost; median of ${repeat}`);

    const tsx = join(ROOT, 'node_modules/.bin/tsx');
    const ours = (n: number, th = 1) =>
      runChild(tsx, ['tests/bench/index.ts', 'train', '--child', 'ours', '--dir', dir, '--rounds', String(rounds), '--train-rows', String(n), '--threads', String(th)]);
    const py = (which: string, n: number, th = 1, r = rounds) =>
      runChild(PYTHON, [join(ROOT, 'tests/reference/bench_python.py'), which, dir, String(r), String(th), String(n)]);
    const sklearnFullRounds = Number(values['sklearn-full-rounds']);
    const runs: Record<string, Figures[]> = { ours: [], oursThreads: [], xgboost: [], xgboostThreads: [], oursSmall: [], sklearn: [], sklearnFull: [] };
    for (let r = 0; r < repeat; r++) {
      // Each pair runs back to back, so a ratio compares two runs that saw the same machine.
      runs.ours.push(ours(rows));
      if (!values['skip-xgboost']) runs.xgboost.push(py('xgboost', rows, 1));
      if (threads > 1) {
        runs.oursThreads.push(ours(rows, threads));
        if (!values['skip-xgboost']) runs.xgboostThreads.push(py('xgboost', rows, threads));
      }
      if (!values['skip-sklearn']) {
        runs.oursSmall.push(ours(skRows));
        runs.sklearn.push(py('sklearn', skRows));
        // The full set too, for a few rounds only (a round costs the same every round; 200 would take a quarter of an hour).
        if (sklearnFullRounds > 0 && skRows < rows) runs.sklearnFull.push(py('sklearn', rows, 1, sklearnFullRounds));
      }
      console.log(`  run ${r + 1}/${repeat} done`);
    }
    const m = Object.fromEntries(Object.entries(runs).filter(([, v]) => v.length).map(([k, v]) => [k, medianFigures(v)])) as Record<string, Figures>;
    const rowsOut = [
      ['ours (one thread)', m.ours],
      [`ours (${threads} threads, worker_threads)`, m.oursThreads],
      ['xgboost (hist, depth 1)', m.xgboost],
      [`xgboost (hist, depth 1, ${threads} threads)`, m.xgboostThreads],
      [`ours on ${fmtInt(skRows)} rows`, m.oursSmall],
      [`sklearn AdaBoost SAMME on ${fmtInt(skRows)} rows`, m.sklearn],
      [`sklearn AdaBoost SAMME, ${sklearnFullRounds} rounds`, m.sklearnFull],
    ].filter(([, f]) => f) as [string, Figures][];
    console.log('');
    console.log(
      ['contender', 'rows', 'threads', 'fit s', 'ms/round', 'peak MB', 'held-out AUC', 'score rows/s'].map((h, i) => (i ? h.padStart(12) : h.padEnd(40))).join(''),
    );
    for (const [name, f] of rowsOut) {
      console.log(
        [
          name.padEnd(40),
          fmtInt(f.rows).padStart(12),
          String(f.threads).padStart(12),
          fmt(f.fit_s).padStart(12),
          fmt(f.ms_per_round).padStart(12),
          fmt(f.peak_mb, 0).padStart(12),
          fmt(f.auc, 4).padStart(12),
          fmtInt(f.score_rows_per_s).padStart(12),
        ].join(''),
      );
    }
    console.log('');
    console.log('Ratios: the median over runs of each run\'s pair (> 1 means ours is faster / larger):');
    const pairRatio = (a: Figures[], b: Figures[], key: 'ms_per_round' | 'fit_s') => median(a.map((x, i) => x[key] / b[i][key]));
    if (m.xgboost) {
      console.log(`  XGBoost / ours, ms per round, one thread each:  ${fmt(pairRatio(runs.xgboost, runs.ours, 'ms_per_round'))}  (goal >= 2)`);
      if (m.xgboostThreads && m.oursThreads) {
        console.log(`  XGBoost / ours, ms per round, ${threads} threads each: ${fmt(pairRatio(runs.xgboostThreads, runs.oursThreads, 'ms_per_round'))}  (goal >= 2)`);
      }
      console.log(`  XGBoost / ours, fit seconds:         ${fmt(pairRatio(runs.xgboost, runs.ours, 'fit_s'))}`);
      console.log(`  ours - XGBoost, held-out AUC:        ${fmt(m.ours.auc - m.xgboost.auc, 4)}  (goal >= -0.003)`);
      console.log(`  ours / XGBoost, scoring rows/s:      ${fmt(m.ours.score_rows_per_s / m.xgboost.score_rows_per_s)}`);
      console.log(`  ours / XGBoost, peak MB:             ${fmt(m.ours.peak_mb / m.xgboost.peak_mb)}`);
    }
    if (m.sklearn) {
      console.log(`  sklearn / ours (${fmtInt(skRows)} rows), ms per round: ${fmt(pairRatio(runs.sklearn, runs.oursSmall, 'ms_per_round'), 1)}  (goal >= 100)`);
      console.log(`  sklearn / ours (${fmtInt(skRows)} rows), fit seconds:  ${fmt(pairRatio(runs.sklearn, runs.oursSmall, 'fit_s'), 1)}`);
      console.log(`  ours - sklearn, held-out AUC:        ${fmt(m.oursSmall.auc - m.sklearn.auc, 4)}`);
      if (m.sklearnFull) {
        console.log(`  sklearn (${sklearnFullRounds} rounds) / ours, ${fmtInt(rows)} rows, ms per round: ${fmt(pairRatio(runs.sklearnFull, runs.ours, 'ms_per_round'), 1)}  (goal >= 100)`);
      }
    }
    console.log('');
    const budgetMb = (rows * specs.length + 4 * 8 * rows) / 1e6;
    console.log(`Ours at ${fmtInt(rows)} x ${specs.length}: ${fmt(m.ours.ms_per_round)} ms/round wall on one thread, ${fmt(m.ours.cpu_ms_per_round)} ms/round CPU (goal < 15)`);
    if (m.oursThreads) console.log(`  with ${threads} threads: ${fmt(m.oursThreads.ms_per_round)} ms/round wall, ${fmt(m.oursThreads.cpu_ms_per_round)} ms/round CPU over all threads`);
    console.log(`  binning ${fmtInt(rows)} rows: ${fmt(m.ours.binning_s)} s (goal < 1)`);
    console.log(`  compiled scoring, ${m.ours.rounds} rounds, one core: ${fmtInt(m.ours.score_rows_per_s)} rows/s (goal >= 5,000,000)`);
    console.log(`  peak memory during fit ${fmt(m.ours.peak_mb, 0)} MB; budget n x F code bytes + 4 float arrays = ${fmt(budgetMb, 0)} MB`);
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
