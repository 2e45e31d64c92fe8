import { readFileSync } from 'node:fs';
import { sleep } from './log';

/**
 * Helpers for processes we did not spawn in this run: leftovers of an earlier
 * run whose orchestrator was killed. Checked against /proc so a recycled pid
 * belonging to something else is never signalled.
 */

export function readPidFile(file: string): number | undefined {
  try {
    const pid = Number.parseInt(readFileSync(file, 'utf8').trim(), 10);
    return Number.isInteger(pid) && pid > 1 ? pid : undefined;
  } catch {
    return undefined;
  }
}

/** Alive and not a zombie: in a container PID 1 may never reap orphans, so kill(pid, 0) alone lies. */
export function isAlive(pid: number): boolean {
  try {
    process.kill(pid, 0);
  } catch (e) {
    if ((e as NodeJS.ErrnoException).code !== 'EPERM') return false;
  }
  try {
    const stat = readFileSync(`/proc/${pid}/stat`, 'utf8');
    const state = stat.slice(stat.lastIndexOf(')') + 2, stat.lastIndexOf(')') + 3);
    return state !== 'Z' && state !== 'X';
  } catch {
    return false;
  }
}

export function commandLineOf(pid: number): string {
  try {
    return readFileSync(`/proc/${pid}/cmdline`, 'utf8').split('\0').join(' ').trim();
  } catch {
    return '';
  }
}

/** The pid from `file`, if that process is alive and its command line contains every marker. */
export function livePidMatching(file: string, markers: string[]): number | undefined {
  const pid = readPidFile(file);
  if (pid === undefined || !isAlive(pid)) return undefined;
  const cmd = commandLineOf(pid);
  return markers.every((m) => cmd.includes(m)) ? pid : undefined;
}

export async function waitForPidExit(pid: number, timeoutMs: number): Promise<boolean> {
  const until = Date.now() + timeoutMs;
  while (Date.now() < until) {
    if (!isAlive(pid)) return true;
    await sleep(100);
  }
  return !isAlive(pid);
}

/** SIGTERM, then SIGKILL after `graceMs`. */
export async function terminatePid(pid: number, graceMs = 15_000): Promise<void> {
  try {
    process.kill(pid, 'SIGTERM');
  } catch {
    return;
  }
  if (await waitForPidExit(pid, graceMs)) return;
  try {
    process.kill(pid, 'SIGKILL');
  } catch {
    return;
  }
  await waitForPidExit(pid, 5_000);
}
