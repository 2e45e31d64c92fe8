/**
 * `npm start`: the whole product on local defaults, with demo data.
 *
 * Installs missing Debian packages (as root), starts a private MariaDB (own
 * datadir, 127.0.0.1 only), a private Redis (append-only file on) and the
 * local mail catcher, runs migrations and the one-time demo seed, builds the
 * client when its sources changed, then starts the app processes listed in
 * CHILDREN below and waits for the web server's health check.
 *
 * Data lives in `.data/demo` (or `.data/demo-<PORT>` when PORT is not 3000, so
 * a second copy can run beside the first; EDGECASE_DATA_DIR overrides) and
 * survives restarts. Ports: PORT (3000), DB_PORT (3307), REDIS_PORT (6380),
 * SMTP_PORT (2525). Other settings (DB_NAME, DB_USER, DB_PASSWORD,
 * REDIS_PREFIX, LOG_LEVEL, HOST...) pass through to every child.
 *
 * Ctrl-C or SIGTERM stops the app processes, then the mail catcher, Redis and
 * MariaDB; a second Ctrl-C kills everything at once. When an app process or a
 * service dies on its own, the whole stack is shut down and the command exits
 * 1: a restart loop would hide the crash behind a page that keeps reconnecting,
 * and the output above the shutdown already shows why it died.
 */
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { describeExit, spawnChild } from './services/child';
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
import { waitForHttp } from './services/wait';
import { startWebhookCatcher, type WebhookCatcherHandle } from './services/webhook-catcher';

/** The app processes, one line each; the first one is the web server whose health is awaited. */
const CHILDREN: AppChildSpec[] = [
  { name: 'web', script: 'server/src/index.ts' },
  { name: 'worker', script: 'workers/src/index.ts', args: ['--only=scoring,mail,outgoing,maintenance,drift'] },
  // Training boosts for minutes at a time: a process of its own, so scoring never waits on it.
  { name: 'training', script: 'workers/src/index.ts', args: ['--only=training'] },
  // Invented live traffic through the real ingest API (pause it or change its rate on the Admin screen).
  { name: 'feed', script: 'scripts/demo-feed.ts' },
];

const DEMO_ACCOUNTS = ['investigator@demo.test', 'supervisor@demo.test', 'scientist@demo.test', 'admin@demo.test'];

const HELP = `Usage: npm start [-- --rebuild]

Runs Edgecase locally with demo data: private MariaDB, Redis and mail catcher,
migrations and demo seed, the client build, the web server and the workers.

  --rebuild   build the client even if its sources did not change
  --help      this text

Environment: PORT (3000), DB_PORT (3307), REDIS_PORT (6380), SMTP_PORT (2525),
EDGECASE_DATA_DIR (.data/demo, or .data/demo-<PORT> for another PORT),
DB_NAME, DB_USER, DB_PASSWORD, REDIS_PREFIX, LOG_LEVEL, HOST.
Ctrl-C stops everything; the data stays for the next run.`;

class Interrupted extends Error {}

async function main(): Promise<number> {
  const argv = process.argv.slice(2);
  if (argv.includes('--help') || argv.includes('-h')) {
    console.log(HELP);
    return 0;
  }
  const unknown = argv.filter((a) => a !== '--rebuild');
  if (unknown.length > 0) {
    console.error(`Unknown option(s): ${unknown.join(' ')}\n\n${HELP}`);
    return 2;
  }
  const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
  const log = tagged('start', 'green');

  const ports = {
    web: portFromEnv('PORT', 3000),
    db: portFromEnv('DB_PORT', 3307),
    redis: portFromEnv('REDIS_PORT', 6380),
    smtp: portFromEnv('SMTP_PORT', 2525),
  };
  const dataDir = process.env.EDGECASE_DATA_DIR || (ports.web === 3000 ? '.data/demo' : `.data/demo-${ports.web}`);
  const paths = stackPaths(path.resolve(root, dataDir));
  const dbName = process.env.DB_NAME || 'edgecase';
  const dbUser = process.env.DB_USER || 'edgecase';
  const dbPassword = process.env.DB_PASSWORD ?? 'edgecase';
  const env = {
    ...process.env,
    ...appEnv({
      mode: 'demo',
      paths,
      ports,
      root,
      dbName,
      dbUser,
      dbPassword,
      redisPrefix: process.env.REDIS_PREFIX || 'edgecase',
      host: process.env.HOST || '127.0.0.1',
      logLevel: process.env.LOG_LEVEL || 'info',
    }),
  };

  let exitCode = 0;
  let requestStop: () => void = () => undefined;
  const stopRequested = new Promise<void>((resolve) => (requestStop = resolve));
  const signal = onStopSignals(() => requestStop(), log);
  const checkpoint = () => {
    if (signal.aborted) throw new Interrupted();
  };
  const fail = (message: string) => {
    if (exitCode === 0 && !signal.aborted) log(paint('red', message));
    exitCode = 1;
    requestStop();
  };

  let release: (() => void) | undefined;
  let services: Services | undefined;
  let children: AppChild[] = [];
  let upstream: WebhookCatcherHandle | undefined;
  let stopping = false;
  try {
    await ensureDebianPackages(['mariadb-server', 'redis-server'], log);
    checkpoint();
    release = await claimDataFolder(paths, { wipe: false, log });
    log(`data folder ${paths.dataDir}`);
    services = await startServices({
      paths,
      ports,
      databases: [dbName],
      dbUser,
      dbPassword,
      redisAppendOnly: true,
      fast: false,
      log,
      onServiceDied: (name, info) => {
        if (!stopping) fail(`${name} stopped unexpectedly (${describeExit(info)}); see ${paths.logs}/${name}.log`);
      },
    });
    checkpoint();

    log('migrating the database and seeding demo data (first run only)');
    const migrate = spawnChild({
      name: 'migrate',
      ...tsxCommand(root, 'server/src/db/migrate-cli.ts', ['--seed-demo']),
      cwd: root,
      env,
      logFile: path.join(paths.logs, 'migrate.log'),
      signal,
    });
    const migrated = await migrate.exited;
    checkpoint();
    if (migrated.code !== 0) throw new Error(`migrations failed (${describeExit(migrated)})`);

    await buildClientIfNeeded({ root, force: argv.includes('--rebuild'), log, logFile: path.join(paths.logs, 'vite-build.log'), signal });
    checkpoint();

    // The demo's stand-in for the issuer's card system receives card blocks and unblocks.
    upstream = await startWebhookCatcher({
      dir: path.join(paths.dataDir, 'upstream-events'),
      port: 0,
      secret: env.UPSTREAM_WEBHOOK_SECRET || 'edgecase-demo-webhook-secret',
      log,
    });
    env.UPSTREAM_WEBHOOK_URL = upstream.url;
    children = startAppChildren(CHILDREN, { root, paths, env, echo: 'prefix' });
    for (const c of children) {
      void c.handle.exited.then((info) => {
        if (!stopping) fail(`${c.spec.name} exited unexpectedly (${describeExit(info)}); shutting everything down`);
      });
    }
    const web = children[0];
    const urlHost = env.HOST === '0.0.0.0' || env.HOST === '::' ? '127.0.0.1' : env.HOST;
    const url = `http://${urlHost}:${ports.web}`;
    try {
      await waitForHttp(`${url}/api/health`, {
        signal,
        timeoutMs: 120_000,
        failFast: () => (exitCode !== 0 ? 'a process stopped' : undefined),
      });
    } catch (e) {
      checkpoint();
      if (exitCode === 0) {
        log(`last lines of ${web.spec.name}.log:\n${indent(await tailFile(path.join(paths.logs, `${web.spec.name}.log`)))}`);
      }
      throw e;
    }
    checkpoint();

    const line = paint('green', '─'.repeat(72));
    const demoPassword = process.env.DEMO_PASSWORD || 'demo-password';
    console.log(
      [
        '',
        line,
        `  ${paint('bold', 'Edgecase is running:')} ${paint('bold', url)}`,
        '',
        `  Demo sign-ins (password ${demoPassword}):`,
        ...DEMO_ACCOUNTS.map((a) => `    ${a}`),
        '',
        `  Web ${ports.web} · MariaDB 127.0.0.1:${ports.db} (database ${dbName}) · Redis 127.0.0.1:${ports.redis} · SMTP 127.0.0.1:${ports.smtp}`,
        `  Data folder ${paths.dataDir} (logs in logs/, caught mail in mail/, card-system events in upstream-events/)`,
        '  Ctrl-C stops everything; the data stays for the next run.',
        line,
        '',
      ].join('\n'),
    );
    await stopRequested;
  } catch (e) {
    if (!(e instanceof Interrupted) && !signal.aborted) {
      log(paint('red', e instanceof Error ? e.message : String(e)));
      exitCode = 1;
    }
  } finally {
    stopping = true;
    await stopAppChildren(children, log);
    await upstream?.stop().catch(() => undefined);
    if (services) {
      log('stopping services');
      await services.stop();
    }
    release?.();
    log(exitCode === 0 ? 'stopped' : 'stopped after an error');
  }
  return exitCode;
}

process.exit(await main());
