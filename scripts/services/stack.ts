import { existsSync, mkdirSync, readdirSync, readFileSync, rmSync, unlinkSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { spawnChild, type ChildHandle, type ExitInfo, type SpawnChildOptions } from './child';
import type { Logger } from './log';
import { startMariaDb, runningMariaDbPid, type MariaDbHandle } from './mariadb';
import { commandLineOf, isAlive, readPidFile, terminatePid } from './pids';
import { startRedis, runningRedisPid, type RedisHandle } from './redis';
import { startSmtpCatcher, type SmtpCatcherHandle } from './smtp-catcher';
import { assertPortsFree } from './wait';

/**
 * What the start and test commands share: one data folder holding private
 * MariaDB, Redis and mail-catcher state, the environment contract every app
 * process receives, and the app processes themselves.
 *
 * Data folder layout: mysql/ (datadir), redis/, mail/, uploads/, logs/, run/
 * (sockets, pid files, and owner.pid naming the orchestrator that uses it).
 */

export interface Ports {
  web: number;
  db: number;
  redis: number;
  smtp: number;
}

export interface StackPaths {
  dataDir: string;
  mysql: string;
  redis: string;
  mail: string;
  uploads: string;
  logs: string;
  run: string;
}

export function stackPaths(dataDir: string): StackPaths {
  const d = path.resolve(dataDir);
  return {
    dataDir: d,
    mysql: path.join(d, 'mysql'),
    redis: path.join(d, 'redis'),
    mail: path.join(d, 'mail'),
    uploads: path.join(d, 'uploads'),
    logs: path.join(d, 'logs'),
    run: path.join(d, 'run'),
  };
}

/** Reads a port from the environment, with a readable failure for nonsense. */
export function portFromEnv(name: string, fallback: number): number {
  const raw = process.env[name];
  if (raw === undefined || raw === '') return fallback;
  const n = Number(raw);
  if (!Number.isInteger(n) || n < 1 || n > 65535) throw new Error(`${name}=${raw} is not a port number`);
  return n;
}

const ORCHESTRATOR_MARKERS = ['scripts/start.ts', 'scripts/test.ts'];

/**
 * Makes this process the only user of the data folder. Another live start/test
 * command on it is refused; services and app processes left behind by one that
 * was killed (its owner.pid is dead) are stopped, so they cannot block ports or
 * the datadir. Optionally wipes the folder afterwards. Returns the release.
 */
export async function claimDataFolder(p: StackPaths, opts: { wipe: boolean; log: Logger }): Promise<() => void> {
  const ownerFile = path.join(p.run, 'owner.pid');
  const owner = readPidFile(ownerFile);
  if (owner !== undefined && owner !== process.pid && isAlive(owner)) {
    const cmd = commandLineOf(owner);
    if (ORCHESTRATOR_MARKERS.some((m) => cmd.includes(m))) {
      throw new Error(
        `${p.dataDir} is in use by another run (pid ${owner}: ${cmd}).\n` +
          `Stop it first, or run this copy on other ports / another data folder (see --help).`,
      );
    }
  }
  const leftovers: { what: string; pid: number }[] = [];
  // App processes first, then the services they use, as in a normal shutdown.
  if (existsSync(p.run)) {
    for (const f of readdirSync(p.run).filter((n) => n.startsWith('app-') && n.endsWith('.pid'))) {
      // App pid files hold the pid and the script path, so a recycled pid is never taken for ours.
      const [pidLine, script] = readFileSync(path.join(p.run, f), 'utf8').split('\n');
      const pid = Number.parseInt(pidLine, 10);
      if (script && Number.isInteger(pid) && isAlive(pid) && commandLineOf(pid).includes(script)) {
        leftovers.push({ what: f.slice(4, -4), pid });
      }
    }
  }
  const db = runningMariaDbPid({ dataDir: p.mysql, runDir: p.run, logDir: p.logs });
  if (db !== undefined) leftovers.push({ what: 'mariadbd', pid: db });
  const rd = runningRedisPid({ dataDir: p.redis, runDir: p.run, logDir: p.logs });
  if (rd !== undefined) leftovers.push({ what: 'redis-server', pid: rd });
  for (const l of leftovers) {
    opts.log(`stopping ${l.what} (pid ${l.pid}) left running by an earlier run that did not shut down`);
    await terminatePid(l.pid);
  }
  if (opts.wipe) rmSync(p.dataDir, { recursive: true, force: true });
  // mysql/ is left to MariaDB's own initialisation, which treats an existing one as ready.
  for (const d of [p.dataDir, p.redis, p.mail, p.uploads, p.logs, p.run]) mkdirSync(d, { recursive: true });
  writeFileSync(ownerFile, `${process.pid}\n`);
  return () => {
    if (readPidFile(ownerFile) === process.pid) unlinkSync(ownerFile);
  };
}

export interface Services {
  mariadb: MariaDbHandle;
  redis: RedisHandle;
  smtp: SmtpCatcherHandle;
  /** Stops mail catcher, Redis, MariaDB, in that order; never throws. */
  stop(): Promise<void>;
}

export interface StartServicesOptions {
  paths: StackPaths;
  ports: Ports;
  databases: string[];
  dbUser: string;
  dbPassword: string;
  redisAppendOnly: boolean;
  /** Test profile: faster, less durable MariaDB settings. */
  fast: boolean;
  log: Logger;
  /** A service died on its own (not through stop/restart). */
  onServiceDied: (name: string, info: ExitInfo) => void;
}

export async function startServices(o: StartServicesOptions): Promise<Services> {
  await assertPortsFree([
    { port: o.ports.web, what: 'web server', setting: o.fast ? 'TEST_PORT' : 'PORT' },
    { port: o.ports.db, what: 'MariaDB', setting: o.fast ? 'TEST_DB_PORT' : 'DB_PORT' },
    { port: o.ports.redis, what: 'Redis', setting: o.fast ? 'TEST_REDIS_PORT' : 'REDIS_PORT' },
    { port: o.ports.smtp, what: 'SMTP catcher', setting: o.fast ? 'TEST_SMTP_PORT' : 'SMTP_PORT' },
  ]);
  const started: { name: string; stop: () => Promise<void> }[] = [];
  const stopAll = async () => {
    for (const s of started.reverse()) {
      try {
        await s.stop();
      } catch (e) {
        o.log(`stopping ${s.name} failed: ${(e as Error).message}`);
      }
    }
    started.length = 0;
  };
  try {
    const mariadb = await startMariaDb({
      dataDir: o.paths.mysql,
      runDir: o.paths.run,
      logDir: o.paths.logs,
      port: o.ports.db,
      databases: o.databases,
      user: o.dbUser,
      password: o.dbPassword,
      fast: o.fast,
      log: o.log,
      onUnexpectedExit: (info) => o.onServiceDied('mariadb', info),
    });
    started.push({ name: 'MariaDB', stop: () => mariadb.stop() });
    const redis = await startRedis({
      dataDir: o.paths.redis,
      runDir: o.paths.run,
      logDir: o.paths.logs,
      port: o.ports.redis,
      appendOnly: o.redisAppendOnly,
      log: o.log,
      onUnexpectedExit: (info) => o.onServiceDied('redis', info),
    });
    started.push({ name: 'Redis', stop: () => redis.stop() });
    const smtp = await startSmtpCatcher({ dir: o.paths.mail, port: o.ports.smtp, log: o.log });
    started.push({ name: 'SMTP catcher', stop: () => smtp.stop() });
    return { mariadb, redis, smtp, stop: stopAll };
  } catch (e) {
    await stopAll();
    throw e;
  }
}

export interface EnvContract {
  mode: 'demo' | 'test' | 'production';
  paths: StackPaths;
  ports: Ports;
  root: string;
  dbName: string;
  dbUser: string;
  dbPassword: string;
  redisPrefix: string;
  host?: string;
  logLevel?: string;
}

/** Exactly the settings the server and workers read (server/src/config), the same for every child. */
export function appEnv(c: EnvContract): Record<string, string> {
  return {
    EDGECASE_MODE: c.mode,
    PORT: String(c.ports.web),
    HOST: c.host ?? '127.0.0.1',
    DB_HOST: '127.0.0.1',
    DB_PORT: String(c.ports.db),
    DB_NAME: c.dbName,
    DB_USER: c.dbUser,
    DB_PASSWORD: c.dbPassword,
    REDIS_HOST: '127.0.0.1',
    REDIS_PORT: String(c.ports.redis),
    REDIS_PREFIX: c.redisPrefix,
    SMTP_HOST: '127.0.0.1',
    SMTP_PORT: String(c.ports.smtp),
    MAIL_CATCHER_DIR: c.paths.mail,
    UPLOAD_DIR: c.paths.uploads,
    CLIENT_DIST: path.join(c.root, 'dist', 'client'),
    LOG_LEVEL: c.logLevel ?? 'info',
  };
}

export interface AppChildSpec {
  /** Output prefix, log file name and pid file name. */
  name: string;
  /** Repository-relative TypeScript entry point, run with tsx. */
  script: string;
  args?: string[];
  /** Added to the common environment for this child only. */
  env?: Record<string, string>;
}

/** `node --import tsx <script>`: what `npx tsx` does, minus the extra npx and tsx-cli processes in between. */
export function tsxCommand(root: string, script: string, args: string[] = []): { command: string; args: string[] } {
  const abs = path.join(root, script);
  if (!existsSync(abs)) throw new Error(`${script} does not exist (yet)`);
  return { command: process.execPath, args: ['--import', 'tsx', abs, ...args] };
}

export interface AppChild {
  spec: AppChildSpec;
  handle: ChildHandle;
}

/** Starts each app process with the common environment; pid files let a later run clean up after a killed one. */
export function startAppChildren(
  specs: AppChildSpec[],
  o: { root: string; paths: StackPaths; env: NodeJS.ProcessEnv; echo: SpawnChildOptions['echo'] },
): AppChild[] {
  const width = Math.max(...specs.map((s) => s.name.length));
  const out: AppChild[] = [];
  for (const spec of specs) {
    const cmd = tsxCommand(o.root, spec.script, spec.args);
    const handle = spawnChild({
      name: spec.name,
      ...cmd,
      cwd: o.root,
      env: { ...o.env, ...spec.env },
      logFile: path.join(o.paths.logs, `${spec.name}.log`),
      echo: o.echo,
      prefixWidth: width,
    });
    const pidFile = path.join(o.paths.run, `app-${spec.name}.pid`);
    if (handle.pid !== undefined) writeFileSync(pidFile, `${handle.pid}\n${path.join(o.root, spec.script)}\n`);
    void handle.exited.then(() => {
      if (readPidFile(pidFile) === handle.pid) rmSync(pidFile, { force: true });
    });
    out.push({ spec, handle });
  }
  return out;
}

/** Stops app processes in reverse start order, so the web server is the last to go. */
export async function stopAppChildren(children: AppChild[], log: Logger, graceMs = 15_000): Promise<void> {
  for (const c of [...children].reverse()) {
    if (c.handle.exitInfo) continue;
    const t = setTimeout(() => log(`${c.spec.name} is still shutting down...`), 5_000);
    await c.handle.stop(graceMs);
    clearTimeout(t);
  }
}
