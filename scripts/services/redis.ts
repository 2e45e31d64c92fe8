import { existsSync, mkdirSync, unlinkSync } from 'node:fs';
import path from 'node:path';
import type { ExitInfo } from './child';
import type { Logger } from './log';
import { livePidMatching } from './pids';
import { AlreadyRunningError, ServerProcess } from './server-process';
import { firstBytesFrom, isPortFree } from './wait';

export interface RedisOptions {
  /** Where the AOF / RDB files live. */
  dataDir: string;
  port: number;
  /** Append-only file: on for the demo (data survives restarts), optional in tests. */
  appendOnly: boolean;
  /** RDB snapshots (`save` rules); off when false. Defaults to on when appendOnly is on. */
  snapshots?: boolean;
  /** Pid file; defaults to `run/` beside the datadir. */
  runDir?: string;
  /** `redis.log`; defaults to `logs/` beside the datadir. */
  logDir?: string;
  extraArgs?: string[];
  startTimeoutMs?: number;
  log?: Logger;
  /** Called when the server exits without stop()/restart()/kill() having asked it to. */
  onUnexpectedExit?: (info: ExitInfo) => void;
}

export interface RedisHandle {
  readonly host: string;
  readonly port: number;
  readonly dataDir: string;
  readonly logFile: string;
  readonly pid: number | undefined;
  /** SIGTERM: Redis flushes the AOF (or writes a snapshot) and exits. */
  stop(): Promise<void>;
  /** Stops (if running) and starts again on the same port and data; resolves when PING answers. */
  restart(): Promise<void>;
  /** SIGKILL, as a crash would. */
  kill(): Promise<void>;
}

function layout(opts: Pick<RedisOptions, 'dataDir' | 'runDir' | 'logDir'>) {
  const dataDir = path.resolve(opts.dataDir);
  const runDir = path.resolve(opts.runDir ?? path.join(path.dirname(dataDir), 'run'));
  const logDir = path.resolve(opts.logDir ?? path.join(path.dirname(dataDir), 'logs'));
  return { dataDir, runDir, logDir, pidFile: path.join(runDir, 'redis.pid'), logFile: path.join(logDir, 'redis.log') };
}

/** Pid of a redis-server still using this data folder (e.g. left behind by a killed run), if any. */
export function runningRedisPid(opts: Pick<RedisOptions, 'dataDir' | 'runDir' | 'logDir'>): number | undefined {
  const l = layout(opts);
  return livePidMatching(l.pidFile, ['redis-server']);
}

/** True once the server answers PING with PONG (not LOADING while it replays the AOF). */
async function pong(port: number): Promise<boolean> {
  const b = await firstBytesFrom('127.0.0.1', port, 'PING\r\n');
  return b?.toString('utf8').startsWith('+PONG') ?? false;
}

/**
 * A private Redis: own port on 127.0.0.1, own data folder, no config file.
 * Like MariaDB, refuses to start when a server from an earlier run still holds
 * the same data folder.
 */
export async function startRedis(opts: RedisOptions): Promise<RedisHandle> {
  const log = opts.log ?? (() => undefined);
  const l = layout(opts);
  for (const d of [l.dataDir, l.runDir, l.logDir]) mkdirSync(d, { recursive: true });
  const snapshots = opts.snapshots ?? opts.appendOnly;
  const args = [
    '--port', String(opts.port),
    '--bind', '127.0.0.1',
    '--protected-mode', 'yes',
    '--dir', l.dataDir,
    '--daemonize', 'no',
    '--pidfile', l.pidFile,
    '--logfile', '',
    '--maxmemory-policy', 'noeviction',
    '--appendonly', opts.appendOnly ? 'yes' : 'no',
    ...(snapshots ? [] : ['--save', '']),
    ...(opts.extraArgs ?? []),
  ];

  const server = new ServerProcess({
    title: 'Redis',
    command: 'redis-server',
    args,
    logFile: l.logFile,
    ready: () => pong(opts.port),
    startTimeoutMs: opts.startTimeoutMs ?? 60_000,
    onUnexpectedExit: opts.onUnexpectedExit,
  });

  const launch = async () => {
    const other = runningRedisPid(opts);
    if (other !== undefined) {
      throw new AlreadyRunningError(`Redis is already running for ${l.dataDir} (pid ${other}). Stop the copy that started it, or give this one another data folder.`);
    }
    if (existsSync(l.pidFile)) unlinkSync(l.pidFile);
    if (!(await isPortFree(opts.port))) throw new Error(`Redis: port ${opts.port} is already in use on 127.0.0.1.`);
    await server.start();
  };

  const stop = async () => {
    const p = server.expectExit();
    if (!p) return;
    // A large AOF rewrite or snapshot can take a while; SIGKILL only as a last resort.
    await p.stop(60_000);
  };

  await launch();
  log(`Redis ready on 127.0.0.1:${opts.port} (append-only ${opts.appendOnly ? 'on' : 'off'})`);

  return {
    host: '127.0.0.1',
    port: opts.port,
    dataDir: l.dataDir,
    logFile: l.logFile,
    get pid() {
      return server.pid;
    },
    stop,
    async restart() {
      await stop();
      await launch();
    },
    kill: () => server.kill(),
  };
}
