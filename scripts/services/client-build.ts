import { createHash } from 'node:crypto';
import { existsSync, readdirSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { spawnChild, describeExit, type SpawnChildOptions } from './child';
import type { Logger } from './log';

/** Everything the client bundle is made from; a change in any of these means a rebuild. */
const INPUTS = ['client', 'shared', 'vite.config.ts', 'tailwind.config.ts', 'package-lock.json'];

function addTree(hash: ReturnType<typeof createHash>, root: string, rel: string): void {
  const abs = path.join(root, rel);
  if (!existsSync(abs)) {
    hash.update(`missing:${rel}\n`);
    return;
  }
  if (statSync(abs).isDirectory()) {
    for (const name of readdirSync(abs).sort()) {
      if (name === 'node_modules' || name === '.DS_Store') continue;
      addTree(hash, root, path.join(rel, name));
    }
    return;
  }
  hash.update(`file:${rel}\n`);
  hash.update(readFileSync(abs));
  hash.update('\n');
}

export function clientInputsHash(root: string): string {
  const h = createHash('sha256');
  for (const i of INPUTS) addTree(h, root, i);
  return h.digest('hex');
}

export interface BuildClientOptions {
  root: string;
  /** Build even when the stamp says nothing changed. */
  force?: boolean;
  log: Logger;
  /** How vite's own output is shown / kept. */
  echo?: SpawnChildOptions['echo'];
  logFile?: string;
  env?: NodeJS.ProcessEnv;
  signal?: AbortSignal;
}

/**
 * Builds the client to dist/client unless its inputs are unchanged since the
 * last successful build (a hash stamp in dist/). Resolves with whether it built.
 */
export async function buildClientIfNeeded(opts: BuildClientOptions): Promise<{ built: boolean }> {
  const stamp = path.join(opts.root, 'dist', 'client-build.sha256');
  const hash = clientInputsHash(opts.root);
  const haveOutput = existsSync(path.join(opts.root, 'dist', 'client', 'index.html'));
  if (!opts.force && haveOutput && existsSync(stamp) && readFileSync(stamp, 'utf8').trim() === hash) {
    opts.log('client build is up to date (dist/client); --rebuild forces one');
    return { built: false };
  }
  opts.log('building the client (vite build)');
  const c = spawnChild({
    name: 'vite',
    command: path.join(opts.root, 'node_modules', '.bin', 'vite'),
    args: ['build'],
    cwd: opts.root,
    env: opts.env ?? process.env,
    echo: opts.echo ?? 'prefix',
    logFile: opts.logFile,
    signal: opts.signal,
  });
  const info = await c.exited;
  if (info.code !== 0) throw new Error(`vite build failed (${describeExit(info)})`);
  // Stamp the hash taken before the build: an edit made during the build triggers the next one.
  writeFileSync(stamp, `${hash}\n`);
  return { built: true };
}
