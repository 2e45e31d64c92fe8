/**
 * Benchmark dispatcher: `npm run bench -- <subcommand> [flags]`.
 * Each subcommand is a module exporting `run(argv: string[]): Promise<void>`.
 */
const SUBCOMMANDS: Record<string, () => Promise<{ run: (argv: string[]) => Promise<void> }>> = {
  train: () => import('./train'),
  pipeline: () => import('./pipeline'),
  console: () => import('./console'),
  faults: () => import('./faults'),
};

async function main(): Promise<void> {
  const [name, ...rest] = process.argv.slice(2);
  const load = name ? SUBCOMMANDS[name] : undefined;
  if (!load) {
    console.error(`Usage: npm run bench -- <${Object.keys(SUBCOMMANDS).join('|')}> [flags]`);
    process.exitCode = 2;
    return;
  }
  await (await load()).run(rest);
}

await main();
