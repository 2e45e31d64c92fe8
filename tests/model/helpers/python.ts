/**
 * Runs the Python reference scripts with Debian's interpreter. The pyenv
 * `python3` on PATH has no scikit-learn, so /usr/bin/python3 is used always.
 * A missing python3-sklearn fails the test with a clear message: a reference
 * check that silently skipped would pass without checking anything.
 */
import { execFileSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, renameSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';

export const PYTHON = '/usr/bin/python3';
const REFERENCE_DIR = resolve(import.meta.dirname, '../../reference');

/** Throws with the install command when Debian's scikit-learn stack is not importable. */
export function requireSklearn(): void {
  try {
    execFileSync(PYTHON, ['-c', 'import sklearn, numpy, pandas'], { stdio: 'pipe' });
  } catch (e) {
    throw new Error(
      `The reference checks need Debian's scikit-learn for ${PYTHON} (apt-get install -y python3-sklearn python3-pandas); ` +
        `importing it failed: ${(e as { stderr?: Buffer }).stderr?.toString().trim() ?? String(e)}`,
    );
  }
}

export function runReference(script: string, args: string[], timeoutMs = 90_000): void {
  requireSklearn();
  execFileSync(PYTHON, [join(REFERENCE_DIR, script), ...args], { stdio: ['ignore', 'pipe', 'pipe'], timeout: timeoutMs });
}

/** A temp dir removed by the returned cleanup. */
export function tempDir(prefix: string): { dir: string; cleanup: () => void } {
  const dir = mkdtempSync(join(tmpdir(), prefix));
  return { dir, cleanup: () => rmSync(dir, { recursive: true, force: true }) };
}

export function readJson<T>(path: string): T {
  return JSON.parse(readFileSync(path, 'utf8')) as T;
}

export function writeJson(path: string, value: unknown): void {
  writeFileSync(path, JSON.stringify(value));
}

export interface BreastCancer {
  features: string[];
  columns: number[][];
  /** sklearn's target: 0 malignant, 1 benign. */
  target: number[];
}

/**
 * Runs sklearn's SAMME loop on the breast-cancer data (see
 * tests/reference/adaboost_stump_reference.py) and returns the data it used
 * and its per-round results.
 */
export function sklearnAdaBoostReference(rounds: number): {
  data: BreastCancer;
  reference: {
    sklearn: string;
    rounds: { feature: number; threshold: number; polarity: number; error: number; weight: number }[];
    decision: number[];
  };
} {
  const t = tempDir('edgecase-ada-');
  try {
    runReference('adaboost_stump_reference.py', [t.dir, String(rounds)]);
    return { data: readJson(join(t.dir, 'data.json')), reference: readJson(join(t.dir, 'reference.json')) };
  } finally {
    t.cleanup();
  }
}

/**
 * The breast-cancer data as scikit-learn ships it, written once by the
 * reference script and cached in the temp dir for the other test files
 * (the reference comparisons themselves always run Python).
 */
export function breastCancerData(): BreastCancer {
  const cache = join(tmpdir(), 'edgecase-breast-cancer-v1.json');
  if (existsSync(cache)) return readJson<BreastCancer>(cache);
  const data = sklearnAdaBoostReference(1).data;
  const part = `${cache}.${process.pid}.part`;
  writeFileSync(part, JSON.stringify(data));
  renameSync(part, cache);
  return data;
}
