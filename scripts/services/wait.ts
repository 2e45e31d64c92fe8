import net from 'node:net';
import { sleep } from './log';

export interface WaitOptions {
  timeoutMs?: number;
  intervalMs?: number;
  /** Stops waiting early (Ctrl-C). */
  signal?: AbortSignal;
  /** Checked on every round: a message means "give up now" (e.g. the process already died). */
  failFast?: () => string | undefined;
}

export class WaitError extends Error {}

/** Polls `probe` until it returns true. */
export async function waitUntil(what: string, probe: () => Promise<boolean>, opts: WaitOptions = {}): Promise<void> {
  const timeoutMs = opts.timeoutMs ?? 60_000;
  const until = Date.now() + timeoutMs;
  for (;;) {
    if (opts.signal?.aborted) throw new WaitError(`gave up waiting for ${what}: interrupted`);
    const fatal = opts.failFast?.();
    if (fatal) throw new WaitError(`gave up waiting for ${what}: ${fatal}`);
    if (await probe().catch(() => false)) return;
    if (Date.now() >= until) throw new WaitError(`timed out after ${Math.round(timeoutMs / 1000)} s waiting for ${what}`);
    await sleep(opts.intervalMs ?? 250);
  }
}

/** Waits until `url` answers 2xx. */
export async function waitForHttp(url: string, opts: WaitOptions = {}): Promise<void> {
  await waitUntil(
    url,
    async () => {
      const res = await fetch(url, { signal: AbortSignal.timeout(3_000) });
      await res.arrayBuffer();
      return res.ok;
    },
    { timeoutMs: 120_000, ...opts },
  );
}

/** Connects, and resolves with the first bytes the server sends (undefined when refused or silent). */
export function firstBytesFrom(host: string, port: number, send?: string, timeoutMs = 2_000): Promise<Buffer | undefined> {
  return new Promise((resolve) => {
    const sock = net.connect({ host, port });
    const done = (b: Buffer | undefined) => {
      sock.destroy();
      resolve(b);
    };
    sock.setTimeout(timeoutMs, () => done(undefined));
    sock.once('error', () => done(undefined));
    sock.once('connect', () => {
      if (send !== undefined) sock.write(send);
    });
    sock.once('data', (b) => done(b));
  });
}

/** True when nothing listens on host:port (we can bind it ourselves). */
export function isPortFree(port: number, host = '127.0.0.1'): Promise<boolean> {
  return new Promise((resolve) => {
    const srv = net.createServer();
    srv.once('error', () => resolve(false));
    srv.listen({ port, host, exclusive: true }, () => srv.close(() => resolve(true)));
  });
}

/** Fails with a message that says which setting moves the service elsewhere. */
export async function assertPortsFree(ports: { port: number; what: string; setting: string }[]): Promise<void> {
  const busy: string[] = [];
  for (const p of ports) {
    if (!(await isPortFree(p.port))) busy.push(`  ${p.what}: port ${p.port} is already in use on 127.0.0.1 (choose another with ${p.setting}=...)`);
  }
  if (busy.length > 0) {
    throw new Error(`Cannot start, ports are taken (is another copy running?):\n${busy.join('\n')}`);
  }
}
