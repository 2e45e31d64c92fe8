import { spawn } from 'node:child_process';
import { createWriteStream, mkdirSync, type WriteStream } from 'node:fs';
import path from 'node:path';
import type { Readable } from 'node:stream';
import { paint, pickPrefixColour, type Colour } from './log';

export interface ExitInfo {
  code: number | null;
  signal: NodeJS.Signals | null;
  /** Set when the command could not be started at all (e.g. not found). */
  error?: Error;
}

export interface SpawnChildOptions {
  /** Short name used as the output prefix and in messages. */
  name: string;
  command: string;
  args?: string[];
  cwd?: string;
  /** The complete environment of the child (merge with process.env yourself). */
  env?: NodeJS.ProcessEnv;
  /** Every line of output is appended here too. */
  logFile?: string;
  /** Console output: each line prefixed with the name, passed through as is, or not shown. */
  echo?: 'prefix' | 'raw' | 'none';
  /** Pad prefixes to this width so several children line up. */
  prefixWidth?: number;
  colour?: Colour;
  /** Written to the child's stdin, which is then closed; otherwise stdin is /dev/null (CI has none). */
  input?: string;
  /** Aborting stops the child (SIGTERM to its group, SIGKILL after 10 s). */
  signal?: AbortSignal;
}

export interface ChildHandle {
  readonly name: string;
  readonly pid: number | undefined;
  /** Resolves once the child has exited and its output is flushed. Never rejects. */
  readonly exited: Promise<ExitInfo>;
  /** Undefined while running. */
  readonly exitInfo: ExitInfo | undefined;
  /** Signal the child's whole process group (tsx, npx and shells spawn grandchildren). */
  signal(sig: NodeJS.Signals): void;
  /** SIGTERM to the group, SIGKILL after `graceMs`. */
  stop(graceMs?: number): Promise<ExitInfo>;
  /** The last few kilobytes of output, for error messages. */
  recentOutput(): string;
}

const live = new Set<ChildHandle>();

/** Last resort on a crash of the orchestrator itself: nothing we started may outlive us. */
export function killAllChildrenNow(): void {
  for (const c of live) c.signal('SIGKILL');
}
process.on('exit', killAllChildrenNow);

const RECENT_LIMIT = 16 * 1024;

/**
 * Spawns a child in its own process group. That matters twice: Ctrl-C at a
 * terminal signals the whole foreground group, and we want services to stop
 * in order (app first, databases last) rather than all at once; and stopping
 * a `tsx` or `npx` child must also stop the node process it spawned.
 */
export function spawnChild(opts: SpawnChildOptions): ChildHandle {
  const echo = opts.echo ?? 'prefix';
  const colour = opts.colour ?? pickPrefixColour();
  const prefix = paint(colour, `${opts.name.padEnd(opts.prefixWidth ?? opts.name.length)} |`);
  let log: WriteStream | undefined;
  if (opts.logFile) {
    mkdirSync(path.dirname(opts.logFile), { recursive: true });
    log = createWriteStream(opts.logFile, { flags: 'a' });
  }
  let recent = '';

  const child = spawn(opts.command, opts.args ?? [], {
    cwd: opts.cwd,
    env: opts.env ?? process.env,
    detached: true,
    stdio: [opts.input === undefined ? 'ignore' : 'pipe', 'pipe', 'pipe'],
  });
  if (opts.input !== undefined && child.stdin) {
    child.stdin.on('error', () => undefined);
    child.stdin.end(opts.input);
  }

  const pipe = (stream: Readable | null, sink: NodeJS.WriteStream) => {
    if (!stream) return;
    let partial = '';
    const emit = (line: string) => {
      if (echo === 'prefix') sink.write(`${prefix} ${line}\n`);
      else if (echo === 'raw') sink.write(`${line}\n`);
    };
    stream.setEncoding('utf8');
    stream.on('data', (chunk: string) => {
      log?.write(chunk);
      recent = (recent + chunk).slice(-RECENT_LIMIT);
      const lines = (partial + chunk).split('\n');
      partial = lines.pop() ?? '';
      for (const l of lines) emit(l);
    });
    stream.on('end', () => {
      if (partial) emit(partial);
      partial = '';
    });
  };
  pipe(child.stdout, process.stdout);
  pipe(child.stderr, process.stderr);

  let exitInfo: ExitInfo | undefined;
  const exited = new Promise<ExitInfo>((resolve) => {
    let settled = false;
    const finish = (info: ExitInfo) => {
      if (settled) return;
      settled = true;
      exitInfo = info;
      live.delete(handle);
      if (log) log.end(() => resolve(info));
      else resolve(info);
    };
    child.on('error', (error) => {
      // 'error' without a pid means it never started; with a pid, 'exit' still follows.
      if (child.pid === undefined) finish({ code: 127, signal: null, error });
    });
    child.on('exit', (code, signal) => {
      // A grandchild that keeps our pipes open must not hold up the exit forever.
      const t = setTimeout(() => finish({ code, signal }), 2_000);
      child.on('close', () => {
        clearTimeout(t);
        finish({ code, signal });
      });
    });
  });

  const signalGroup = (sig: NodeJS.Signals) => {
    if (child.pid === undefined || exitInfo) return;
    try {
      process.kill(-child.pid, sig);
    } catch {
      try {
        child.kill(sig);
      } catch {
        // already gone
      }
    }
  };

  const handle: ChildHandle = {
    name: opts.name,
    pid: child.pid,
    exited,
    get exitInfo() {
      return exitInfo;
    },
    signal: signalGroup,
    async stop(graceMs = 10_000) {
      if (exitInfo) return exitInfo;
      signalGroup('SIGTERM');
      const timer = setTimeout(() => signalGroup('SIGKILL'), graceMs);
      const info = await exited;
      clearTimeout(timer);
      return info;
    },
    recentOutput: () => recent,
  };
  live.add(handle);
  if (opts.signal) {
    const onAbort = () => void handle.stop();
    if (opts.signal.aborted) onAbort();
    else {
      opts.signal.addEventListener('abort', onAbort, { once: true });
      void exited.then(() => opts.signal?.removeEventListener('abort', onAbort));
    }
  }
  return handle;
}

/** Runs a command to completion; resolves with its exit info and output. */
export async function runCommand(
  opts: SpawnChildOptions & { timeoutMs?: number },
): Promise<ExitInfo & { output: string; timedOut: boolean }> {
  const c = spawnChild({ echo: 'none', ...opts });
  let timedOut = false;
  const timer =
    opts.timeoutMs === undefined
      ? undefined
      : setTimeout(() => {
          timedOut = true;
          void c.stop(5_000);
        }, opts.timeoutMs);
  const info = await c.exited;
  if (timer) clearTimeout(timer);
  return { ...info, output: c.recentOutput(), timedOut };
}

export function describeExit(info: ExitInfo): string {
  if (info.error) return `could not start (${info.error.message})`;
  if (info.signal) return `killed by ${info.signal}`;
  return `exit code ${info.code}`;
}
