/**
 * `npm test`: every check, on test ports with a fresh data folder.
 *
 * Steps, in order: Debian packages, private services (MariaDB with databases
 * edgecase_test and edgecase_e2e, Redis, mail catcher), type-check, lint,
 * Vitest (unit, client, integration), the fault tests (Vitest project reliability, on their own), client build, e2e database (migrate +
 * demo seed), e2e server + workers, Playwright. Every step runs even when an
 * earlier one failed, unless it cannot (e2e without a server, integration
 * tests without services). Then a summary table, and as the last line
 * `N passed, N failed[, N skipped]`: Vitest and Playwright test counts, plus 1
 * failed for each failed step that is not a test run (and for a test run that
 * failed without a failing test, e.g. a crash), plus 1 skipped for each step
 * that could not run. Exit 0 only when nothing failed.
 *
 * Services are stopped at the end, also on Ctrl-C; their logs and the app's
 * stay in <data folder>/logs. See HELP below for options and settings.
 */
import { existsSync, mkdirSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { describeExit, spawnChild, type ExitInfo } from './services/child';
import { buildClientIfNeeded } from './services/client-build';
import { ensureDebianPackages } from './services/debian';
import { indent, paint, tagged, tailFile } from './services/log';
import { onStopSignals } from './services/signals';
import {
  appEnv,
  claimDataFolder,
  portFromEnv,
  stackPaths,
  startAppChildren,
  startServices,
  stopAppChildren,
  tsxCommand,
  type AppChild,
  type AppChildSpec,
  type Services,
} from './services/stack';
import { VITEST_PROJECTS } from './services/vitest-projects';
import { waitForHttp } from './services/wait';

/** The app processes the end-to-end tests run against; the first is the web server. */
const E2E_CHILDREN: AppChildSpec[] = [
  { name: 'web', script: 'server/src/index.ts' },
  { name: 'worker', script: 'workers/src/index.ts' },
];

const SELECTABLE = ['typecheck', 'lint', 'unit', 'client', 'integration', 'reliability', 'build', 'e2e'] as const;
type Selectable = (typeof SELECTABLE)[number];

const HELP = `Usage: npm test [-- options]

Runs every check on test ports with a fresh data folder, then prints a summary
whose last line is "N passed, N failed".

Options:
  --only=a,b      run only these parts: ${SELECTABLE.join(', ')}
                  (unit, client, integration, reliability are Vitest
                  projects; e2e also builds the client and starts the server;
                  integration and e2e use the run's MariaDB/Redis, reliability
                  starts its own; the others need no services)
  --skip=a,b      run everything except these parts
  --rebuild       build the client even if its sources did not change
  --redis-aof     run the test Redis with its append-only file on
  --files=a,b     pass these file filters to Vitest (e.g. --only=integration
                  --files=tests/integration/access.test.ts)
  --help          this text
  (also accepted as "--only a,b" and "--skip a,b")

Environment: PORT (3100), DB_PORT (3317), REDIS_PORT (6390), SMTP_PORT (2535),
EDGECASE_DATA_DIR (.data/test, or .data/test-<PORT> for another PORT; wiped at
the start, and only ever a folder an earlier test run made), DB_USER,
DB_PASSWORD. Databases: edgecase_test (Vitest), edgecase_e2e (Playwright).
Logs: <data folder>/logs. Ctrl-C stops everything.`;

type Status = 'passed' | 'failed' | 'skipped';
interface TestCounts {
  passed: number;
  failed: number;
  skipped: number;
  /** "file › test: first line of the error", for the summary. */
  failures?: string[];
  /** Tests that failed once and passed on their retry. */
  flaky?: string[];
}
interface StepResult {
  name: string;
  status: Status;
  seconds: number;
  tests?: TestCounts;
  note?: string;
}
interface StepOutcome {
  ok: boolean;
  tests?: TestCounts;
  note?: string;
}

function parseArgs(argv: string[]): { selected: Set<Selectable>; rebuild: boolean; redisAof: boolean; files: string[] } | 'help' {
  const opts = { selected: new Set<Selectable>(SELECTABLE), rebuild: false, redisAof: false, files: [] as string[] };
  const list = (v: string | undefined, flag: string): Selectable[] => {
    const parts = (v ?? '').split(',').map((s) => s.trim()).filter(Boolean);
    const bad = parts.filter((p) => !(SELECTABLE as readonly string[]).includes(p));
    if (parts.length === 0 || bad.length > 0) throw new Error(`${flag}: expected a comma-separated list of ${SELECTABLE.join(', ')}${bad.length ? ` (not: ${bad.join(', ')})` : ''}`);
    return parts as Selectable[];
  };
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i];
    const [flag, inline] = a.includes('=') ? [a.slice(0, a.indexOf('=')), a.slice(a.indexOf('=') + 1)] : [a, undefined];
    if (flag === '--help' || flag === '-h') return 'help';
    else if (flag === '--rebuild') opts.rebuild = true;
    else if (flag === '--redis-aof') opts.redisAof = true;
    else if (flag === '--files') opts.files = (inline ?? argv[++i] ?? '').split(',').map((f) => f.trim()).filter(Boolean);
    else if (flag === '--only' || flag === '--skip') {
      const value = inline ?? argv[++i];
      const parts = list(value, flag);
      if (flag === '--only') opts.selected = new Set(parts);
      else for (const p of parts) opts.selected.delete(p);
    } else throw new Error(`unknown option ${a}`);
  }
  return opts;
}

const MARKER = '.edgecase-test-data';

/** The test data folder is wiped each run: never wipe one that a test run did not make. */
function assertWipeable(dir: string): void {
  if (!existsSync(dir) || readdirSync(dir).length === 0 || existsSync(path.join(dir, MARKER))) return;
  throw new Error(
    `${dir} exists and was not made by a test run (no ${MARKER} file inside); refusing to wipe it. ` +
      `Point EDGECASE_DATA_DIR at another folder.`,
  );
}

interface VitestJson {
  numPassedTests: number;
  numFailedTests: number;
  numPendingTests: number;
  numTodoTests: number;
  testResults: {
    name: string;
    status: string;
    message?: string;
    assertionResults: { status: string; fullName: string; failureMessages?: string[] }[];
  }[];
}

/** The first line of a failure message, short enough for the summary. */
function firstLine(message: string | undefined): string {
  const line = (message ?? '').split('\n').map((l) => l.trim()).find(Boolean) ?? '';
  return line.length > 300 ? `${line.slice(0, 300)}…` : line;
}

/**
 * Counts from Vitest's JSON report; a file that failed to load counts as one failure. Failures are
 * listed by file and test name; a test that passed after a failed attempt (CI allows one retry) is
 * listed as flaky, so a retry never hides a failure from the reader.
 */
function vitestCounts(file: string, root: string): TestCounts | undefined {
  if (!existsSync(file)) return undefined;
  const r = JSON.parse(readFileSync(file, 'utf8')) as VitestJson;
  const failures: string[] = [];
  const flaky: string[] = [];
  let brokenFiles = 0;
  for (const f of r.testResults) {
    const where = path.relative(root, f.name);
    if (f.status === 'failed' && !f.assertionResults.some((a) => a.status === 'failed')) {
      brokenFiles += 1;
      failures.push(`${where}: ${firstLine(f.message) || 'the file failed outside its tests'}`);
    }
    for (const a of f.assertionResults) {
      const why = firstLine(a.failureMessages?.[0]);
      if (a.status === 'failed') failures.push(`${where} › ${a.fullName}: ${why}`);
      else if (a.status === 'passed' && (a.failureMessages?.length ?? 0) > 0) flaky.push(`${where} › ${a.fullName}: ${why}`);
    }
  }
  return { passed: r.numPassedTests, failed: r.numFailedTests + brokenFiles, skipped: r.numPendingTests + r.numTodoTests, failures, flaky };
}

interface PlaywrightSuite {
  title: string;
  file?: string;
  specs?: { title: string; tests: { status: string; results: { status: string; error?: { message?: string } }[] }[] }[];
  suites?: PlaywrightSuite[];
}
interface PlaywrightJson {
  stats: { expected: number; unexpected: number; flaky: number; skipped: number };
  suites?: PlaywrightSuite[];
}

function playwrightCounts(file: string): TestCounts | undefined {
  if (!existsSync(file)) return undefined;
  const r = JSON.parse(readFileSync(file, 'utf8')) as PlaywrightJson;
  const failures: string[] = [];
  const flaky: string[] = [];
  const walk = (s: PlaywrightSuite, file: string) => {
    for (const spec of s.specs ?? []) {
      for (const t of spec.tests) {
        const error = firstLine(t.results.find((x) => x.error)?.error?.message);
        if (t.status === 'unexpected') failures.push(`${file} › ${spec.title}: ${error}`);
        else if (t.status === 'flaky') flaky.push(`${file} › ${spec.title}: ${error}`);
      }
    }
    for (const child of s.suites ?? []) walk(child, s.file ?? file);
  };
  for (const s of r.suites ?? []) walk(s, s.file ?? s.title);
  return { passed: r.stats.expected + r.stats.flaky, failed: r.stats.unexpected, skipped: r.stats.skipped, failures, flaky };
}

/** A test run's outcome: its counts, and one failure more if it failed without a failing test (crash, no tests, bad config). */
function testRunOutcome(info: ExitInfo & { timedOut: boolean }, counts: TestCounts | undefined, what: string): StepOutcome {
  const tests = counts ?? { passed: 0, failed: 0, skipped: 0 };
  if (info.code === 0 && counts) return { ok: tests.failed === 0, tests };
  const note = info.timedOut ? 'timed out' : counts ? undefined : `${describeExit(info)}, no ${what} report`;
  if (tests.failed === 0) return { ok: false, tests: { ...tests, failed: 1 }, note: note ?? `${describeExit(info)} without a failing test` };
  return { ok: false, tests, note };
}

async function main(): Promise<number> {
  let parsed: ReturnType<typeof parseArgs>;
  try {
    parsed = parseArgs(process.argv.slice(2));
  } catch (e) {
    console.error(`${(e as Error).message}\n\n${HELP}`);
    return 2;
  }
  if (parsed === 'help') {
    console.log(HELP);
    return 0;
  }
  const { selected, rebuild, redisAof, files } = parsed;
  const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
  const log = tagged('test', 'green');
  const bin = (name: string) => path.join(root, 'node_modules', '.bin', name);

  const ports = {
    web: portFromEnv('PORT', 3100),
    db: portFromEnv('DB_PORT', 3317),
    redis: portFromEnv('REDIS_PORT', 6390),
    smtp: portFromEnv('SMTP_PORT', 2535),
  };
  const paths = stackPaths(
    path.resolve(root, process.env.EDGECASE_DATA_DIR || (ports.web === 3100 ? '.data/test' : `.data/test-${ports.web}`)),
  );
  const reports = path.join(paths.dataDir, 'reports');
  const dbUser = process.env.DB_USER || 'edgecase';
  const dbPassword = process.env.DB_PASSWORD ?? 'edgecase';
  const envFor = (dbName: string, redisPrefix: string, uploads: string): NodeJS.ProcessEnv => ({
    ...process.env,
    ...appEnv({ mode: 'test', paths, ports, root, dbName, dbUser, dbPassword, redisPrefix, logLevel: process.env.LOG_LEVEL || 'info' }),
    UPLOAD_DIR: path.join(paths.uploads, uploads),
  });
  const vitestEnv = envFor('edgecase_test', 'edgecase_test', 'vitest');
  const e2eEnv = {
    ...envFor('edgecase_e2e', 'edgecase_e2e', 'e2e'),
    E2E_BASE_URL: `http://127.0.0.1:${ports.web}`,
    // A smaller invented history than the demo's keeps the e2e seed (and its first training run) short.
    DEMO_HISTORY_DAYS: process.env.DEMO_HISTORY_DAYS || '45',
    DEMO_CARDHOLDERS: process.env.DEMO_CARDHOLDERS || '900',
  };

  const vitestProjects = VITEST_PROJECTS.filter((p) => selected.has(p));
  const wantE2e = selected.has('e2e');
  const needServices = selected.has('integration') || wantE2e;
  const packages = [
    ...(needServices || selected.has('reliability') ? ['mariadb-server', 'redis-server'] : []),
    ...(wantE2e ? ['chromium'] : []),
    // Reference libraries the model and ingest-contract tests check against.
    ...(vitestProjects.length > 0 ? ['python3-sklearn', 'python3-pandas', 'python3-babel', 'iso-codes'] : []),
  ];

  const signal = onStopSignals(() => undefined, log);
  const results: StepResult[] = [];
  const resultOf = (name: string) => results.find((r) => r.name === name);
  const passedStep = (name: string) => resultOf(name)?.status === 'passed';

  /** Runs one step, timed, unless interrupted or one of `needs` did not pass. */
  const step = async (name: string, needs: string[], timeoutMs: number, body: (s: AbortSignal) => Promise<StepOutcome>) => {
    const blocked = signal.aborted ? 'interrupted' : needs.find((n) => !passedStep(n));
    if (blocked) {
      results.push({ name, status: 'skipped', seconds: 0, note: blocked === 'interrupted' ? 'interrupted' : `needs ${blocked}` });
      return;
    }
    console.log(`\n${paint('bold', `━━ ${name} ${'━'.repeat(Math.max(4, 60 - name.length))}`)}`);
    const timeout = AbortSignal.timeout(timeoutMs);
    const s = AbortSignal.any([signal, timeout]);
    const t0 = performance.now();
    let outcome: StepOutcome;
    try {
      outcome = await body(s);
    } catch (e) {
      outcome = { ok: false, note: (e as Error).message.split('\n')[0] };
      console.log(paint('red', (e as Error).message));
    }
    if (timeout.aborted && !signal.aborted) outcome = { ...outcome, ok: false, note: `timed out after ${Math.round(timeoutMs / 60_000)} min` };
    if (signal.aborted && !outcome.ok) outcome = { ...outcome, note: 'interrupted' };
    const seconds = (performance.now() - t0) / 1000;
    results.push({ name, status: outcome.ok ? 'passed' : 'failed', seconds, tests: outcome.tests, note: outcome.note });
    const verdict = outcome.ok ? paint('green', 'passed') : paint('red', 'failed');
    console.log(`${paint('bold', `━━ ${name}:`)} ${verdict} in ${seconds.toFixed(1)} s${outcome.note ? ` (${outcome.note})` : ''}`);
  };

  /** A command from node_modules/.bin, output shown and kept in logs/<name>.log. */
  const tool = async (name: string, command: string, args: string[], s: AbortSignal, env: NodeJS.ProcessEnv = process.env) => {
    const c = spawnChild({ name, command, args, cwd: root, env, echo: 'raw', logFile: path.join(paths.logs, `${name}.log`), signal: s });
    const info = await c.exited;
    return { ...info, timedOut: s.aborted && !signal.aborted };
  };
  const plainOutcome = (info: ExitInfo & { timedOut: boolean }): StepOutcome => ({ ok: info.code === 0, note: info.code === 0 ? undefined : describeExit(info) });

  let release: (() => void) | undefined;
  let services: Services | undefined;
  let appChildren: AppChild[] = [];
  try {
    try {
      assertWipeable(paths.dataDir);
      release = await claimDataFolder(paths, { wipe: true, log });
    } catch (e) {
      console.error(paint('red', (e as Error).message));
      results.push({ name: 'data folder', status: 'failed', seconds: 0, note: 'in use or not a test folder (see above)' });
      return summarise(results, false);
    }
    writeFileSync(path.join(paths.dataDir, MARKER), 'made by npm test; wiped at the start of each test run\n');
    for (const d of [reports, path.join(paths.uploads, 'vitest'), path.join(paths.uploads, 'e2e')]) mkdirSync(d, { recursive: true });
    log(`data folder ${paths.dataDir} (fresh); logs in ${paths.logs}`);

    if (packages.length > 0) {
      await step('packages', [], 20 * 60_000, async () => {
        await ensureDebianPackages(packages, log);
        return { ok: true };
      });
    }
    if (needServices) {
      await step('services', ['packages'], 5 * 60_000, async () => {
        services = await startServices({
          paths,
          ports,
          databases: ['edgecase_test', 'edgecase_e2e'],
          dbUser,
          dbPassword,
          redisAppendOnly: redisAof,
          fast: true,
          log,
          onServiceDied: (name, info) => log(paint('red', `${name} stopped unexpectedly (${describeExit(info)}); see ${paths.logs}/${name}.log`)),
        });
        return { ok: true, note: `MariaDB ${ports.db}, Redis ${ports.redis}, SMTP ${ports.smtp}` };
      });
    }
    if (selected.has('typecheck')) {
      await step('typecheck', [], 10 * 60_000, async (s) => plainOutcome(await tool('typecheck', bin('tsc'), ['-p', 'tsconfig.json', '--noEmit'], s)));
    }
    if (selected.has('lint')) {
      await step('lint', [], 10 * 60_000, async (s) => plainOutcome(await tool('lint', bin('eslint'), ['.'], s)));
    }
    if (vitestProjects.length > 0) {
      // Without services the integration project cannot run, but unit and client tests still can.
      const runnable = passedStep('services') ? vitestProjects : vitestProjects.filter((p) => p !== 'integration');
      const dropped = runnable.length < vitestProjects.length;
      // The fault tests load both cores for minutes: they run on their own, after the rest, so
      // they do not slow the timing-sensitive unit tests down and are not slowed down by them.
      const groups = [
        { name: 'vitest', projects: runnable.filter((p) => p !== 'reliability'), dropped },
        { name: 'faults', projects: runnable.filter((p) => p === 'reliability'), dropped: false },
      ];
      if (runnable.length === 0) {
        results.push({ name: 'vitest', status: 'skipped', seconds: 0, note: 'needs services' });
      }
      for (const group of groups.filter((g) => g.projects.length > 0)) {
        await step(group.name, [], 25 * 60_000, async (s) => {
          const report = path.join(reports, `${group.name}.json`);
          const info = await tool(
            group.name,
            bin('vitest'),
            ['run', ...group.projects.map((p) => `--project=${p}`), ...files, ...(files.length > 0 ? ['--passWithNoTests'] : []), '--reporter=default', '--reporter=json', `--outputFile.json=${report}`],
            s,
            vitestEnv,
          );
          const outcome = testRunOutcome(info, vitestCounts(report, root), 'Vitest');
          if (!group.dropped) return outcome;
          return { ...outcome, tests: { ...(outcome.tests ?? { passed: 0, failed: 0 }), skipped: (outcome.tests?.skipped ?? 0) + 1 }, note: 'integration not run: services down' };
        });
      }
    }
    if (selected.has('build') || wantE2e) {
      await step('build', [], 10 * 60_000, async (s) => {
        await buildClientIfNeeded({ root, force: rebuild, log, echo: 'raw', logFile: path.join(paths.logs, 'build.log'), signal: s });
        return { ok: true };
      });
    }
    if (wantE2e) {
      // The demo seed back-fills weeks of history and trains the first champion: minutes, not seconds.
      await step('e2e-database', ['services'], 20 * 60_000, async (s) => {
        const c = spawnChild({
          name: 'migrate',
          ...tsxCommand(root, 'server/src/db/migrate-cli.ts', ['--seed-demo']),
          cwd: root,
          env: e2eEnv,
          echo: 'raw',
          logFile: path.join(paths.logs, 'e2e-migrate.log'),
          signal: s,
        });
        return plainOutcome({ ...(await c.exited), timedOut: false });
      });
      await step('e2e-server', ['build', 'e2e-database'], 3 * 60_000, async (s) => {
        appChildren = startAppChildren(E2E_CHILDREN, { root, paths, env: e2eEnv, echo: 'none' });
        const dead = () => appChildren.find((c) => c.handle.exitInfo);
        try {
          await waitForHttp(`${e2eEnv.E2E_BASE_URL}/api/health`, {
            signal: s,
            timeoutMs: 150_000,
            failFast: () => {
              const d = dead();
              return d?.handle.exitInfo ? `${d.spec.name} exited (${describeExit(d.handle.exitInfo)})` : undefined;
            },
          });
        } catch (e) {
          for (const c of appChildren) {
            const file = path.join(paths.logs, `${c.spec.name}.log`);
            console.log(`last lines of ${file}:\n${indent(await tailFile(file, 30))}`);
          }
          throw e;
        }
        return { ok: true, note: `${e2eEnv.E2E_BASE_URL}, logs in logs/web.log, logs/worker.log` };
      });
      await step('playwright', ['e2e-server', 'packages'], 25 * 60_000, async (s) => {
        const report = path.join(reports, 'playwright.json');
        const info = await tool('playwright', bin('playwright'), ['test'], s, { ...e2eEnv, PLAYWRIGHT_JSON_OUTPUT_FILE: report });
        const outcome = testRunOutcome(info, playwrightCounts(report), 'Playwright');
        const died = appChildren.filter((c) => c.handle.exitInfo);
        for (const c of died) {
          const file = path.join(paths.logs, `${c.spec.name}.log`);
          console.log(paint('red', `${c.spec.name} exited during the e2e tests (${describeExit(c.handle.exitInfo!)}); last lines of ${file}:`));
          console.log(indent(await tailFile(file, 30)));
        }
        return died.length ? { ...outcome, ok: false, note: `${died.map((c) => c.spec.name).join(', ')} died` } : outcome;
      });
    }
  } finally {
    if (appChildren.length > 0) await stopAppChildren(appChildren, log);
    if (services) {
      log('stopping services');
      await services.stop();
    }
    release?.();
  }

  return summarise(results, signal.aborted);
}

function summarise(results: StepResult[], interrupted: boolean): number {
  const total: TestCounts = { passed: 0, failed: 0, skipped: 0 };
  for (const r of results) {
    if (r.tests) {
      total.passed += r.tests.passed;
      total.failed += r.tests.failed;
      total.skipped += r.tests.skipped;
    } else if (r.status === 'failed') total.failed += 1;
    else if (r.status === 'skipped') total.skipped += 1;
  }
  const width = Math.max(12, ...results.map((r) => r.name.length));
  const colour = (s: Status) => (s === 'passed' ? paint('green', s.padEnd(8)) : s === 'failed' ? paint('red', s.padEnd(8)) : paint('yellow', s.padEnd(8)));
  const lines = [
    '',
    paint('bold', `${'step'.padEnd(width)}  ${'result'.padEnd(8)}  ${'seconds'.padStart(7)}  details`),
    ...results.map((r) => {
      const tests = r.tests ? `${r.tests.passed} passed, ${r.tests.failed} failed${r.tests.skipped ? `, ${r.tests.skipped} skipped` : ''}` : '';
      const details = [tests, r.note].filter(Boolean).join('; ');
      return `${r.name.padEnd(width)}  ${colour(r.status)}  ${r.seconds.toFixed(1).padStart(7)}  ${details}`;
    }),
    '',
  ];
  // Failed and flaky tests by name, just above the last line, where a reader of the tail finds them.
  for (const r of results) {
    for (const f of r.tests?.failures ?? []) lines.push(paint('red', `failed (${r.name}): ${f}`));
    for (const f of r.tests?.flaky ?? []) lines.push(paint('yellow', `flaky (${r.name}), passed on its retry: ${f}`));
  }
  if (interrupted) lines.push(paint('yellow', 'interrupted: the counts cover only what ran'));
  console.log(lines.join('\n'));
  // Alone on the very last line, for people and CI to read.
  console.log(`${total.passed} passed, ${total.failed} failed${total.skipped ? `, ${total.skipped} skipped` : ''}`);
  if (interrupted) return 130;
  return total.failed === 0 && results.every((r) => r.status !== 'failed') ? 0 : 1;
}

process.exit(await main());
