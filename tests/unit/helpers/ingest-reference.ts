/**
 * Runs tests/reference/ingest-contract-reference.py with Debian's interpreter
 * (the pyenv `python3` on PATH lacks Debian's python3-babel). A missing
 * package fails the test with the install command: a reference check that
 * skipped silently would pass without checking anything.
 */
import { execFileSync } from 'node:child_process';
import { resolve } from 'node:path';

export const PYTHON = '/usr/bin/python3';
const SCRIPT = resolve(import.meta.dirname, '../../reference/ingest-contract-reference.py');

export type ReferenceMode = 'currency-precision' | 'ip' | 'datetime' | 'hmac-sha256';

export function pythonReference<T>(mode: ReferenceMode, input: unknown[]): T[] {
  let stdout: string;
  try {
    stdout = execFileSync(PYTHON, [SCRIPT, mode], {
      input: JSON.stringify(input),
      encoding: 'utf8',
      stdio: ['pipe', 'pipe', 'pipe'],
      timeout: 60_000,
      maxBuffer: 64 * 1024 * 1024,
    });
  } catch (e) {
    const stderr = (e as { stderr?: string }).stderr?.trim();
    throw new Error(`The ${mode} reference (${PYTHON} ${SCRIPT}) failed: ${stderr || String(e)}`);
  }
  const out = JSON.parse(stdout) as T[];
  if (out.length !== input.length) throw new Error(`The ${mode} reference answered ${out.length} of ${input.length} items`);
  return out;
}
