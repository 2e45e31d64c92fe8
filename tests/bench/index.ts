/**
 * Benchmark dispatcher: `npm run bench -- <subcommand> [flags]`.
 * Each subcommand is a module exporting `run(argv: string[]): Promise<void>`.
 */
import { ensureDebianPackages } from '../../scripts/services/debian';

const SUBCOMMANDS: Record<string, () => Promise<{ run: (argv: string[]) => Promise<void> }>> = {
  train: () => import('./train'),
  pipeline: () => import('./pipeline'),
  console: () => import('./console'),
  faults: () => import('./faults'),
};

/** The Debian packages each benchmark runs (installed when missing, as `npm test` and `npm start` do). */
const PACKAGES: Record<string, string[]> = {
  train: ['python3-sklearn', 'python3-xgboost'],
  pipeline: ['mariadb-server', 'redis-server'],
  console: ['mariadb-server', 'redis-server', 'chromium'],
  faults: ['mariadb-server', 'redis-server'],
};

async function main(): Promise<void> {
  const [name, ...rest] = process.argv.slice(2);
  const load = name ? SUBCOMMANDS[name] : undefined;
  if (!load) {
    console.error(`Usage: npm run bench -- <${Object.keys(SUBCOMMANDS).join('|')}> [flags]`);
    process.exitCode = 2;
    return;
  }
  await ensureDebianPackages(PACKAGES[name!] ?? [], (line) => console.log(`[bench] ${line}`));
  await (await load()).run(rest);
}

await main();
// Figures printed and the stack stopped: end here. After a pipeline run the process had no open
// handle left and still did not exit (something the in-process seed started, not found yet).
process.exit();
