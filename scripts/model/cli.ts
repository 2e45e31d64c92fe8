/**
 * The model command line (run as `npm run model -- <command> ...`):
 *
 *   train --data FILE.csv --label COLUMN --out model.json
 *         [--rounds T] [--shrinkage NU] [--exact] [--categorical a,b] [--ignore id,ts]
 *         [--validation FILE.csv] [--patience N] [--positive-weight W] [--seed S]
 *         [--calibration-tail FRACTION] [--trace trace.csv] [--threads N]
 *   score --model model.json --data FILE.csv --out scores.csv [--explain] [--top N] [--id COLUMN]
 *
 * Exit codes: 0 done, 2 bad input (message names the file, line and column), 1 unexpected failure.
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { parseArgs } from 'node:util';
import { stringify } from 'csv-stringify/sync';
import {
  calibratePlatt,
  compileModel,
  explainRow,
  ModelError,
  parseModel,
  probabilityFromMargin,
  rocAuc,
  serializeModel,
  trainModel,
  withCalibration,
  type Model,
  type TrainOptionsInput,
} from '../../shared/src/model';
import { featureSpecs, InputError, readColumns, readCsv, readLabels, sliceSet } from './csv-input';
import { createWorkerHistograms } from './parallel-histograms';

export interface CliIo {
  out: (line: string) => void;
  err: (line: string) => void;
}

const USAGE = `Usage:
  npm run model -- train --data FILE.csv --label COLUMN --out model.json [--rounds T] [--shrinkage NU] [--exact]
                         [--categorical a,b] [--ignore id,ts] [--validation FILE.csv] [--patience N]
                         [--positive-weight W] [--seed S] [--calibration-tail 0.2] [--trace trace.csv] [--threads N]
  npm run model -- score --model model.json --data FILE.csv --out scores.csv [--explain] [--top 3] [--id COLUMN]`;

const list = (s: string | undefined) => (s ? s.split(',').map((x) => x.trim()).filter(Boolean) : []);

function num(name: string, v: string | undefined): number | undefined {
  if (v === undefined) return undefined;
  const x = Number(v);
  if (!Number.isFinite(x)) throw new InputError(`--${name} must be a number, got ${JSON.stringify(v)}`);
  return x;
}

function train(args: string[], io: CliIo): number {
  const { values } = parseArgs({
    args,
    options: {
      data: { type: 'string' },
      label: { type: 'string' },
      out: { type: 'string' },
      rounds: { type: 'string' },
      shrinkage: { type: 'string' },
      exact: { type: 'boolean', default: false },
      categorical: { type: 'string' },
      ignore: { type: 'string' },
      validation: { type: 'string' },
      patience: { type: 'string' },
      'positive-weight': { type: 'string' },
      seed: { type: 'string' },
      'calibration-tail': { type: 'string' },
      trace: { type: 'string' },
      threads: { type: 'string' },
    },
    strict: true,
  });
  if (!values.data || !values.label || !values.out) throw new InputError(`train needs --data, --label and --out\n${USAGE}`);
  const table = readCsv(values.data);
  const labelName = values.label;
  const specs = featureSpecs(table, labelName, list(values.ignore), list(values.categorical));
  const labels = readLabels(table, labelName);
  const columns = readColumns(table, specs);

  let validation: { columns: ReturnType<typeof readColumns>; labels: Int8Array } | undefined;
  let trainSet = { columns, labels };
  let calibrationSet: { columns: ReturnType<typeof readColumns>; labels: Int8Array };
  let calibrationSource: 'validation' | 'holdout-tail';
  if (values.validation) {
    const vt = readCsv(values.validation);
    validation = { columns: readColumns(vt, specs), labels: readLabels(vt, labelName) };
    calibrationSet = validation;
    calibrationSource = 'validation';
  } else {
    const frac = num('calibration-tail', values['calibration-tail']) ?? 0.2;
    if (!(frac > 0 && frac < 1)) throw new InputError('--calibration-tail must be between 0 and 1');
    const n = labels.length;
    const cut = Math.floor(n * (1 - frac));
    if (cut < 1 || cut >= n) throw new InputError(`${table.file}: too few rows (${n}) to hold out a calibration tail`);
    trainSet = sliceSet(columns, labels, 0, cut);
    calibrationSet = sliceSet(columns, labels, cut, n);
    calibrationSource = 'holdout-tail';
  }
  const options: TrainOptionsInput = {
    rounds: num('rounds', values.rounds),
    shrinkage: num('shrinkage', values.shrinkage),
    exact: values.exact,
    seed: num('seed', values.seed),
  };
  const pw = num('positive-weight', values['positive-weight']);
  if (pw !== undefined) options.classWeights = { positive: pw, negative: 1 };
  if (values.patience !== undefined) {
    if (!validation) throw new InputError('--patience (early stopping) needs --validation');
    options.earlyStopping = { patience: num('patience', values.patience) };
  }
  const t0 = performance.now();
  const threads = num('threads', values.threads) ?? 1;
  if (!(Number.isInteger(threads) && threads >= 1)) throw new InputError('--threads must be a whole number >= 1');
  const hooks = threads > 1 ? { histograms: createWorkerHistograms(threads) } : undefined;
  const { model, trace } = trainModel({ features: specs, ...trainSet, validation }, options, hooks);
  const seconds = (performance.now() - t0) / 1000;
  const compiled = compileModel(model);
  const calF = compiled.scoreColumns(calibrationSet.columns);
  const fit = calibratePlatt(calF, calibrationSet.labels);
  const calibrated = withCalibration(model, fit, calibrationSource);
  writeFileSync(values.out, serializeModel(calibrated));
  if (values.trace) {
    writeFileSync(
      values.trace,
      stringify(
        trace.map((r) => ({ ...r, threshold: r.threshold ?? '', category: r.category ?? '', match: r.match ?? '', missingRight: r.missingRight ?? '' })),
        { header: true },
      ),
    );
  }
  const s = model.training;
  const trainAuc = safeAuc(compiled.scoreColumns(trainSet.columns), trainSet.labels);
  const calAuc = safeAuc(calF, calibrationSet.labels);
  io.out(`Trained on ${s.nTrain} rows (${s.nTrainPositive} fraud), ${specs.length} features, in ${seconds.toFixed(2)} s`);
  io.out(`Rounds: ${s.roundsRun} run, ${s.bestRound} kept (stopped by ${s.stoppedBy})`);
  io.out(`Train exp-loss ${s.trainLoss.toFixed(5)}, train error ${(s.trainError * 100).toFixed(2)}%, train AUC ${trainAuc}`);
  if (validation) {
    const best = trace[s.bestRound - 1];
    io.out(`Validation exp-loss ${best?.validationLoss?.toFixed(5) ?? 'n/a'} at the kept round, validation AUC ${calAuc}`);
  } else {
    io.out(
      `No --validation: the last ${calibrationSet.labels.length} rows of ${table.file} were held out of training ` +
        `and used for calibration (held-out AUC ${calAuc})`,
    );
  }
  io.out(`Platt calibration on ${calibrationSource}: p = 1 / (1 + exp(-(${fit.a.toFixed(4)} F ${fit.b < 0 ? '-' : '+'} ${Math.abs(fit.b).toFixed(4)})))`);
  io.out(`Model written to ${values.out}`);
  return 0;
}

function safeAuc(scores: Float64Array, labels: Int8Array): string {
  try {
    return rocAuc(scores, labels).toFixed(4);
  } catch {
    return 'n/a (one class only)';
  }
}

function score(args: string[], io: CliIo): number {
  const { values } = parseArgs({
    args,
    options: {
      model: { type: 'string' },
      data: { type: 'string' },
      out: { type: 'string' },
      explain: { type: 'boolean', default: false },
      top: { type: 'string' },
      id: { type: 'string' },
    },
    strict: true,
  });
  if (!values.model || !values.data || !values.out) throw new InputError(`score needs --model, --data and --out\n${USAGE}`);
  let text: string;
  try {
    text = readFileSync(values.model, 'utf8');
  } catch (e) {
    throw new InputError(`Cannot read ${values.model}: ${(e as Error).message}`);
  }
  const model: Model = parseModel(text);
  const table = readCsv(values.data);
  const columns = readColumns(table, model.features);
  const idCol = values.id ? table.header.indexOf(values.id) : -1;
  if (values.id && idCol < 0) throw new InputError(`${table.file}: unknown id column "${values.id}"`);
  const top = num('top', values.top) ?? 3;
  const compiled = compileModel(model);
  const F = compiled.scoreColumns(columns);
  const header = [...(values.id ? [values.id] : []), 'margin', 'normalized_margin', 'probability'];
  if (values.explain) for (let k = 1; k <= top; k++) header.push(`reason_${k}`, `contribution_${k}`);
  const records: (string | number)[][] = [];
  for (let i = 0; i < F.length; i++) {
    const rec: (string | number)[] = [];
    if (idCol >= 0) rec.push(table.rows[i][idCol]);
    rec.push(F[i], compiled.totalAlpha > 0 ? F[i] / compiled.totalAlpha : 0, probabilityFromMargin(model, F[i]));
    if (values.explain) {
      const row: Record<string, number | string | null> = {};
      for (const f of model.features) {
        const v = columns[f.name][i];
        row[f.name] = typeof v === 'number' ? (Number.isNaN(v) ? null : v) : v;
      }
      const e = explainRow(model, row).contributions;
      for (let k = 0; k < top; k++) rec.push(e[k]?.text ?? '', e[k] ? e[k].contribution : '');
    }
    records.push(rec);
  }
  writeFileSync(values.out, stringify([header, ...records]));
  io.out(`Scored ${F.length} rows with ${model.stumps.length} stumps; written to ${values.out}`);
  return 0;
}

/** Runs the CLI; returns the exit code instead of exiting (testable in-process). */
export function runCli(argv: string[], io: CliIo = { out: (l) => console.log(l), err: (l) => console.error(l) }): number {
  const [command, ...rest] = argv;
  try {
    if (command === 'train') return train(rest, io);
    if (command === 'score') return score(rest, io);
    io.err(USAGE);
    return 2;
  } catch (e) {
    if (e instanceof InputError || e instanceof ModelError) {
      io.err(`error: ${e.message}`);
      return 2;
    }
    if (e instanceof TypeError && (e as { code?: string }).code?.startsWith('ERR_PARSE_ARGS')) {
      io.err(`error: ${e.message}\n${USAGE}`);
      return 2;
    }
    io.err(`unexpected failure: ${(e as Error).stack ?? String(e)}`);
    return 1;
  }
}
