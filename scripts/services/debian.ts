import { execFile } from 'node:child_process';
import { existsSync, unlinkSync, writeFileSync } from 'node:fs';
import { promisify } from 'node:util';
import { spawnChild, describeExit } from './child';
import type { Logger } from './log';

const execFileP = promisify(execFile);

export class MissingPackagesError extends Error {
  constructor(readonly packages: string[], detail: string) {
    super(detail);
  }
}

/** Which of `names` dpkg does not report as installed. */
export async function missingDebianPackages(names: string[]): Promise<string[]> {
  let stdout = '';
  try {
    ({ stdout } = await execFileP('dpkg-query', ['-W', '-f=${Package}\t${Status}\n', ...names]));
  } catch (e) {
    const err = e as NodeJS.ErrnoException & { stdout?: string };
    if (err.code === 'ENOENT') {
      throw new MissingPackagesError(names, `dpkg-query not found: this bootstrap expects Debian 12 with the packages ${names.join(', ')}.`);
    }
    // Exit 1 just means some names are unknown to dpkg; the known ones are still printed.
    stdout = err.stdout ?? '';
  }
  const installed = new Set(
    stdout
      .split('\n')
      .map((l) => l.split('\t'))
      .filter(([, status]) => status?.trim().endsWith(' installed'))
      .map(([pkg]) => pkg.split(':')[0]),
  );
  return names.filter((n) => !installed.has(n));
}

let updated = false;

async function apt(args: string[], log: Logger): Promise<void> {
  const c = spawnChild({
    name: 'apt',
    command: 'apt-get',
    args,
    env: { ...process.env, DEBIAN_FRONTEND: 'noninteractive' },
    echo: 'prefix',
    colour: 'grey',
  });
  const info = await c.exited;
  if (info.code !== 0) {
    log(`apt-get ${args.join(' ')} failed (${describeExit(info)})`);
    throw new Error(`apt-get ${args[0]} failed (${describeExit(info)})`);
  }
}

/**
 * Installs missing Debian packages when running as root; otherwise stops with
 * a message naming them. The system services that the packages' install
 * scripts would start are never used (we run private instances), so a
 * temporary policy-rc.d keeps them from starting when none exists already.
 */
export async function ensureDebianPackages(names: string[], log: Logger = console.log): Promise<void> {
  const missing = await missingDebianPackages(names);
  if (missing.length === 0) return;
  if (process.getuid?.() !== 0) {
    throw new MissingPackagesError(
      missing,
      `Missing Debian packages: ${missing.join(' ')}\n` +
        `Install them once as root, then run this again:\n` +
        `  sudo apt-get install -y --no-install-recommends ${missing.join(' ')}`,
    );
  }
  log(`installing Debian packages: ${missing.join(' ')}`);
  const policy = '/usr/sbin/policy-rc.d';
  const ourPolicy = !existsSync(policy);
  if (ourPolicy) writeFileSync(policy, '#!/bin/sh\n# temporary: keep package installs from starting system services\nexit 101\n', { mode: 0o755 });
  try {
    if (!updated) {
      await apt(['update'], log);
      updated = true;
    }
    await apt(['install', '-y', '--no-install-recommends', ...missing], log);
  } finally {
    if (ourPolicy) unlinkSync(policy);
  }
  const still = await missingDebianPackages(missing);
  if (still.length > 0) throw new MissingPackagesError(still, `apt-get finished but these packages are still not installed: ${still.join(' ')}`);
}
