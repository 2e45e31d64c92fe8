/**
 * `npm run bench -- faults [--soak] [--seconds N] [--rate N]`: the fault suite
 * (tests/reliability/faults.test.ts, which `npm test` runs with 14 s of load
 * at 300 transactions/s per fault) with a longer load per fault. `--soak` is
 * 120 s at 400/s; --seconds and --rate set either. The table is printed and
 * written to artifacts/reliability/faults.md and faults.json, as in CI.
 */
import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { parseArgs } from 'node:util';
import { ROOT } from '../reliability/harness';

export async function run(argv: string[]): Promise<void> {
  const { values } = parseArgs({
    args: argv,
    options: {
      soak: { type: 'boolean', default: false },
      seconds: { type: 'string' },
      rate: { type: 'string' },
      help: { type: 'boolean', default: false },
    },
  });
  if (values.help) {
    console.log('Usage: npm run bench -- faults [--soak] [--seconds N] [--rate N]\n  --soak  120 s of load per fault at 400 transactions/s (default 14 s at 300/s)');
    return;
  }
  const seconds = Number(values.seconds ?? (values.soak ? 120 : 14));
  const rate = Number(values.rate ?? (values.soak ? 400 : 300));
  console.log(`fault suite: ${seconds} s of load per fault at ${rate} transactions/s`);
  const r = spawnSync(
    path.join(ROOT, 'node_modules', '.bin', 'vitest'),
    // Each test's time limit grows with the load (tests/reliability/faults.test.ts).
    ['run', '--project', 'reliability', 'tests/reliability/faults.test.ts'],
    { cwd: ROOT, stdio: 'inherit', env: { ...process.env, EDGECASE_MODE: 'test', FAULT_LOAD_SECONDS: String(seconds), FAULT_LOAD_RATE: String(rate) } },
  );
  process.exitCode = r.status ?? 1;
}
