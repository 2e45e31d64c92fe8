/** The model CLI end to end: train and score files, and exit code 2 with line and column for bad input. */
import { spawnSync } from 'node:child_process';
import { readFileSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { parseModel } from '../../shared/src/model';
import { runCli } from '../../scripts/model/cli';
import { breastCancerData, tempDir } from './helpers/python';

const root = resolve(import.meta.dirname, '../..');
const t = tempDir('edgecase-cli-');
afterAll(() => t.cleanup());

const quiet = () => {
  const lines: string[] = [];
  return { io: { out: (l: string) => lines.push(l), err: (l: string) => lines.push(l) }, lines };
};

function writeCsv(name: string, text: string): string {
  const p = join(t.dir, name);
  writeFileSync(p, text);
  return p;
}

describe('model CLI', () => {
  it('trains and scores the breast-cancer data from CSV, with explanations', () => {
    // Real data written once by the reference script (UCI breast cancer, as scikit-learn ships it).
    const d = breastCancerData();
    const header = ['id', ...d.features, 'benign'];
    const lines = [header.map((h) => JSON.stringify(h)).join(',')];
    d.target.forEach((y, i) => lines.push([i, ...d.columns.map((c) => c[i]), y].join(',')));
    const data = writeCsv('bc.csv', lines.join('\n'));
    const model = join(t.dir, 'bc-model.json');
    const q = quiet();
    expect(runCli(['train', '--data', data, '--label', 'benign', '--ignore', 'id', '--rounds', '30', '--out', model], q.io)).toBe(0);
    expect(q.lines.join('\n')).toMatch(/held out of training and used for calibration/);
    const m = parseModel(readFileSync(model, 'utf8'));
    expect(m.calibration?.fittedOn).toBe('holdout-tail');
    const out = join(t.dir, 'bc-scores.csv');
    expect(runCli(['score', '--model', model, '--data', data, '--out', out, '--explain', '--id', 'id'], quiet().io)).toBe(0);
    const [head, first] = readFileSync(out, 'utf8').trim().split('\n');
    expect(head).toBe('id,margin,normalized_margin,probability,reason_1,contribution_1,reason_2,contribution_2,reason_3,contribution_3');
    expect(first.split(',')[0]).toBe('0');
  }, 60_000);

  it('uses --validation for early stopping and calibration, and writes the round trace', () => {
    const d = breastCancerData();
    const header = [...d.features, 'benign'].map((h) => JSON.stringify(h)).join(',');
    const rows = d.target.map((y, i) => [...d.columns.map((c) => c[i]), y].join(','));
    // Even rows train, odd rows validate (UCI breast cancer as scikit-learn ships it).
    const train = writeCsv('bc-train.csv', [header, ...rows.filter((_, i) => i % 2 === 0)].join('\n'));
    const valid = writeCsv('bc-valid.csv', [header, ...rows.filter((_, i) => i % 2 === 1)].join('\n'));
    const model = join(t.dir, 'bc-val-model.json');
    const trace = join(t.dir, 'bc-trace.csv');
    const q = quiet();
    const code = runCli(
      ['train', '--data', train, '--label', 'benign', '--validation', valid, '--patience', '10', '--rounds', '300', '--exact', '--trace', trace, '--out', model],
      q.io,
    );
    expect(code).toBe(0);
    const m = parseModel(readFileSync(model, 'utf8'));
    expect(m.calibration?.fittedOn).toBe('validation');
    expect(m.training.stoppedBy).toBe('early-stopping');
    expect(q.lines.join('\n')).toMatch(/validation AUC 0\.\d{4}/);
    const traceLines = readFileSync(trace, 'utf8').trim().split('\n');
    expect(traceLines[0]).toMatch(/^round,featureIndex,feature,/);
    expect(traceLines).toHaveLength(m.training.roundsRun + 1);
  }, 60_000);

  const bad: [string, string, string[], RegExp][] = [
    ['unknown label column', 'a,b\n1,0\n2,1\n', ['--label', 'fraud'], /unknown label column "fraud"/],
    ['non-numeric cell', 'a,b,y\n1,2,0\n3,x7,1\n', ['--label', 'y'], /line 3, column "b": "x7" is not a number/],
    ['bad label value', 'a,y\n1,0\n2,yes\n', ['--label', 'y'], /line 3, column "y": label "yes"/],
    ['one class only', 'a,y\n1,0\n2,0\n3,0\n4,0\n5,0\n', ['--label', 'y'], /one class only/],
    ['empty file', '', ['--label', 'y'], /is empty/],
  ];
  for (const [name, text, args, re] of bad) {
    it(`exit code 2: ${name}`, () => {
      const q = quiet();
      const file = writeCsv(`${name.replace(/\W+/g, '-')}.csv`, text);
      expect(runCli(['train', '--data', file, ...args, '--out', join(t.dir, 'x.json')], q.io)).toBe(2);
      expect(q.lines.join('\n')).toMatch(re);
    });
  }

  it('a foreign model file: exit code 2', () => {
    const q = quiet();
    const model = writeCsv('foreign.json', JSON.stringify({ format: 'something-else' }));
    const data = writeCsv('d.csv', 'a\n1\n');
    expect(runCli(['score', '--model', model, '--data', data, '--out', join(t.dir, 's.csv')], q.io)).toBe(2);
    expect(q.lines.join('\n')).toMatch(/Not an Edgecase scoring model/);
  });

  it('the real process exits with code 2 and names the row and column', () => {
    const file = writeCsv('proc.csv', 'amount,y\n12.5,0\n-,1\n');
    const r = spawnSync(join(root, 'node_modules/.bin/tsx'), ['scripts/model.ts', 'train', '--data', file, '--label', 'y', '--out', join(t.dir, 'p.json')], {
      cwd: root,
      encoding: 'utf8',
    });
    expect(r.status).toBe(2);
    expect(r.stderr).toMatch(/line 3, column "amount": "-" is not a number/);
  }, 60_000);
});
