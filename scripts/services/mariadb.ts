import { createHash } from 'node:crypto';
import { existsSync, mkdirSync, readdirSync, rmSync, renameSync, unlinkSync } from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { runCommand, describeExit, type ExitInfo } from './child';
import { indent, type Logger } from './log';
import { livePidMatching } from './pids';
import { AlreadyRunningError, ServerProcess } from './server-process';
import { isPortFree } from './wait';

export interface MariaDbOptions {
  /** The datadir itself (e.g. `.data/demo/mysql`); initialised when it does not exist yet. */
  dataDir: string;
  port: number;
  /** Socket and pid file; defaults to `run/` beside the datadir. */
  runDir?: string;
  /** `mariadb.log`; defaults to `logs/` beside the datadir. */
  logDir?: string;
  /** Created if missing, with utf8mb4. */
  databases?: string[];
  /** The application account, created for 127.0.0.1 and localhost. */
  user?: string;
  password?: string;
  /** The account gets every privilege on databases matching this (plus each of `databases`). */
  grantPattern?: string;
  /** Trade durability for speed (test runs): no binlog, redo log flushed once a second. */
  fast?: boolean;
  bufferPoolMb?: number;
  extraArgs?: string[];
  startTimeoutMs?: number;
  log?: Logger;
  /** Called when the server exits without stop()/restart()/kill() having asked it to. */
  onUnexpectedExit?: (info: ExitInfo) => void;
}

export interface MariaDbHandle {
  readonly host: string;
  readonly port: number;
  readonly socketPath: string;
  readonly dataDir: string;
  readonly logFile: string;
  /** Pid of the running server, undefined while stopped. */
  readonly pid: number | undefined;
  /** Runs SQL as the administrative account over the socket; resolves with the tab-separated rows. */
  admin(sql: string): Promise<string>;
  /** Clean shutdown (mariadb-admin shutdown, then SIGTERM, then SIGKILL). */
  stop(): Promise<void>;
  /** Stops (if running) and starts again on the same datadir and port; resolves when it accepts connections. */
  restart(): Promise<void>;
  /** SIGKILL, as a crash would; restart() afterwards goes through crash recovery. */
  kill(): Promise<void>;
}

const sqlString = (s: string) => `'${s.replace(/\\/g, '\\\\').replace(/'/g, "\\'")}'`;
const sqlIdent = (s: string) => `\`${s.replace(/`/g, '``')}\``;

function layout(opts: Pick<MariaDbOptions, 'dataDir' | 'runDir' | 'logDir'>) {
  const dataDir = path.resolve(opts.dataDir);
  const runDir = path.resolve(opts.runDir ?? path.join(path.dirname(dataDir), 'run'));
  const logDir = path.resolve(opts.logDir ?? path.join(path.dirname(dataDir), 'logs'));
  let socketPath = path.join(runDir, 'mysqld.sock');
  // A Unix socket path must fit in 108 bytes; a deep checkout would not.
  if (Buffer.byteLength(socketPath) > 100) {
    const h = createHash('sha256').update(dataDir).digest('hex').slice(0, 12);
    socketPath = path.join(os.tmpdir(), `edgecase-mysql-${h}`, 'mysqld.sock');
  }
  return { dataDir, runDir, logDir, socketPath, pidFile: path.join(runDir, 'mariadb.pid'), logFile: path.join(logDir, 'mariadb.log') };
}

/** Pid of a mariadbd still serving this datadir (e.g. left behind by a killed run), if any. */
export function runningMariaDbPid(opts: Pick<MariaDbOptions, 'dataDir' | 'runDir' | 'logDir'>): number | undefined {
  const l = layout(opts);
  return livePidMatching(l.pidFile, ['mariadbd', `--datadir=${l.dataDir}`]);
}

/** The OS account that the socket-authenticated administrative MariaDB account is named after. */
const adminUser = () => (process.getuid?.() === 0 ? 'root' : os.userInfo().username);

/** Resolves when the server sends its handshake on the socket, i.e. accepts connections. */
function handshakeOnSocket(socketPath: string): Promise<boolean> {
  return new Promise((resolve) => {
    const sock = net.connect({ path: socketPath });
    const done = (ok: boolean) => {
      sock.destroy();
      resolve(ok);
    };
    sock.setTimeout(2_000, () => done(false));
    sock.once('error', () => done(false));
    // Byte 4 is the protocol version (10) in a handshake; 0xff would be an error packet.
    sock.once('data', (b) => done(b.length > 4 && b[4] === 10));
  });
}

async function initialise(dataDir: string, logFile: string, log: Logger): Promise<void> {
  if (existsSync(dataDir)) {
    if (existsSync(path.join(dataDir, 'mysql'))) return;
    if (readdirSync(dataDir).length > 0) {
      throw new Error(`${dataDir} exists but is not a MariaDB datadir (no mysql/ inside); move it away or pick another data folder.`);
    }
    rmSync(dataDir, { recursive: true });
  }
  // Initialise beside the target and rename, so a crash halfway never leaves a datadir that looks ready.
  const tmp = `${dataDir}.initialising`;
  rmSync(tmp, { recursive: true, force: true });
  mkdirSync(path.dirname(dataDir), { recursive: true });
  log(`initialising a new MariaDB datadir in ${dataDir}`);
  const r = await runCommand({
    name: 'mariadb-install-db',
    command: 'mariadb-install-db',
    args: [
      '--no-defaults',
      `--datadir=${tmp}`,
      `--user=${adminUser()}`,
      '--auth-root-authentication-method=socket',
      '--skip-test-db',
      '--skip-name-resolve',
    ],
    logFile,
    timeoutMs: 120_000,
  });
  if (r.code !== 0) {
    throw new Error(`mariadb-install-db failed (${describeExit(r)}):\n${indent(r.output.split('\n').slice(-30).join('\n'))}`);
  }
  renameSync(tmp, dataDir);
}

/**
 * A private MariaDB server: own datadir, own port on 127.0.0.1, own socket.
 *
 * If a server is still running on the same datadir (its pid file names a live
 * mariadbd for that datadir), this refuses rather than reusing it: a reused
 * server would belong to another orchestrator that may stop it at any moment.
 * A stale pid file from a crash is simply removed.
 */
export async function startMariaDb(opts: MariaDbOptions): Promise<MariaDbHandle> {
  const log = opts.log ?? (() => undefined);
  const l = layout(opts);
  const user = opts.user ?? process.env.DB_USER ?? 'edgecase';
  const password = opts.password ?? process.env.DB_PASSWORD ?? 'edgecase';
  const admin = adminUser();
  mkdirSync(l.runDir, { recursive: true });
  mkdirSync(path.dirname(l.socketPath), { recursive: true });
  mkdirSync(l.logDir, { recursive: true });

  const args = [
    '--no-defaults',
    ...(process.getuid?.() === 0 ? ['--user=root'] : []),
    `--datadir=${l.dataDir}`,
    `--port=${opts.port}`,
    '--bind-address=127.0.0.1',
    `--socket=${l.socketPath}`,
    `--pid-file=${l.pidFile}`,
    `--log-error=${l.logFile}`,
    '--skip-name-resolve',
    `--innodb-buffer-pool-size=${opts.bufferPoolMb ?? 128}M`,
    '--max-connections=300',
    // Fault tests cut connections on purpose; the host cache must not lock 127.0.0.1 out.
    '--max-connect-errors=1000000',
    '--character-set-server=utf8mb4',
    '--collation-server=utf8mb4_unicode_ci',
    '--default-time-zone=+00:00',
    ...(opts.fast ? ['--innodb-flush-log-at-trx-commit=2', '--skip-log-bin'] : []),
    ...(opts.extraArgs ?? []),
  ];

  const clientArgs = ['--no-defaults', `--socket=${l.socketPath}`, '-u', admin];

  const server = new ServerProcess({
    title: 'MariaDB',
    command: 'mariadbd',
    args,
    logFile: l.logFile,
    ready: () => handshakeOnSocket(l.socketPath),
    startTimeoutMs: opts.startTimeoutMs ?? 120_000,
    onUnexpectedExit: opts.onUnexpectedExit,
  });

  const adminSql = async (sql: string): Promise<string> => {
    const r = await runCommand({
      name: 'mariadb',
      command: 'mariadb',
      args: [...clientArgs, '--batch', '--skip-column-names'],
      input: sql,
      timeoutMs: 60_000,
    });
    if (r.code !== 0) throw new Error(`SQL as ${admin} failed (${describeExit(r)}): ${r.output.trim()}`);
    return r.output;
  };

  const launch = async () => {
    const other = runningMariaDbPid(opts);
    if (other !== undefined) {
      throw new AlreadyRunningError(
        `MariaDB is already running on ${l.dataDir} (pid ${other}). Stop the copy that started it ` +
          `(Ctrl-C in its terminal), or give this one another data folder.`,
      );
    }
    for (const stale of [l.pidFile, l.socketPath]) if (existsSync(stale)) unlinkSync(stale);
    if (!(await isPortFree(opts.port))) {
      throw new Error(`MariaDB: port ${opts.port} is already in use on 127.0.0.1.`);
    }
    await initialise(l.dataDir, l.logFile, log);
    await server.start();
  };

  const stop = async () => {
    const p = server.expectExit();
    if (!p) return;
    await runCommand({ name: 'mariadb-admin', command: 'mariadb-admin', args: [...clientArgs, 'shutdown'], timeoutMs: 30_000 });
    const clean = await Promise.race([p.exited.then(() => true), new Promise<boolean>((r) => setTimeout(() => r(false), 60_000))]);
    if (!clean) {
      log('MariaDB did not shut down within 60 s; sending SIGTERM');
      await p.stop(20_000);
    }
  };

  await launch();
  const grantTargets = [opts.grantPattern ?? 'edgecase%', ...(opts.databases ?? [])];
  const accounts = [`${sqlString(user)}@'127.0.0.1'`, `${sqlString(user)}@'localhost'`];
  const sql = [
    ...(opts.databases ?? []).map((d) => `CREATE DATABASE IF NOT EXISTS ${sqlIdent(d)} CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci;`),
    ...accounts.flatMap((a) => [
      `CREATE USER IF NOT EXISTS ${a} IDENTIFIED BY ${sqlString(password)};`,
      // A changed DB_PASSWORD must take effect on an existing datadir too.
      `ALTER USER ${a} IDENTIFIED BY ${sqlString(password)};`,
      ...grantTargets.map((t) => `GRANT ALL PRIVILEGES ON ${sqlIdent(t)}.* TO ${a};`),
    ]),
    'FLUSH PRIVILEGES;',
  ].join('\n');
  try {
    await adminSql(sql);
  } catch (e) {
    await stop();
    throw e;
  }
  log(`MariaDB ready on 127.0.0.1:${opts.port} (socket ${l.socketPath})`);

  return {
    host: '127.0.0.1',
    port: opts.port,
    socketPath: l.socketPath,
    dataDir: l.dataDir,
    logFile: l.logFile,
    get pid() {
      return server.pid;
    },
    admin: adminSql,
    stop,
    async restart() {
      await stop();
      await launch();
    },
    kill: () => server.kill(),
  };
}
