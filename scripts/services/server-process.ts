import { spawnChild, describeExit, type ChildHandle, type ExitInfo } from './child';
import { indent, tailFile } from './log';
import { waitUntil, WaitError } from './wait';

/** A server from an earlier run still holds the data folder. */
export class AlreadyRunningError extends Error {}

export interface ServerProcessOptions {
  /** Human name for messages, e.g. "MariaDB". */
  title: string;
  command: string;
  args: string[];
  logFile: string;
  /** True once the server accepts work. */
  ready: () => Promise<boolean>;
  startTimeoutMs: number;
  onUnexpectedExit?: (info: ExitInfo) => void;
}

/**
 * One long-running server binary that can be started, stopped, killed and
 * started again, telling an exit it asked for from one it did not. Shared by
 * the MariaDB and Redis handles, which add their own checks and shutdown.
 */
export class ServerProcess {
  private proc: ChildHandle | undefined;
  private expectingExit = false;

  constructor(private readonly o: ServerProcessOptions) {}

  get pid(): number | undefined {
    return this.proc && !this.proc.exitInfo ? this.proc.pid : undefined;
  }

  /** The running child, if any. */
  get running(): ChildHandle | undefined {
    return this.proc && !this.proc.exitInfo ? this.proc : undefined;
  }

  /** Spawns and waits until ready; on failure the message carries the tail of the log. */
  async start(): Promise<void> {
    this.expectingExit = false;
    const p = spawnChild({ name: this.o.title, command: this.o.command, args: this.o.args, logFile: this.o.logFile, echo: 'none' });
    this.proc = p;
    void p.exited.then((info) => {
      if (!this.expectingExit && this.proc === p) this.o.onUnexpectedExit?.(info);
    });
    try {
      await waitUntil(this.o.title, this.o.ready, {
        timeoutMs: this.o.startTimeoutMs,
        failFast: () => (p.exitInfo ? `${this.o.command} exited (${describeExit(p.exitInfo)})` : undefined),
      });
    } catch (e) {
      this.expectingExit = true;
      await p.stop(5_000);
      const why = e instanceof WaitError ? e.message : String(e);
      throw new Error(`${this.o.title} did not start: ${why}\nLast lines of ${this.o.logFile}:\n${indent(await tailFile(this.o.logFile))}`);
    }
  }

  /** Marks the coming exit as asked for and returns the running child (undefined when none). */
  expectExit(): ChildHandle | undefined {
    const p = this.running;
    if (p) this.expectingExit = true;
    return p;
  }

  /** SIGKILL, as a crash would. */
  async kill(): Promise<void> {
    const p = this.expectExit();
    if (!p) return;
    p.signal('SIGKILL');
    await p.exited;
  }
}
