import { createHmac, timingSafeEqual } from 'node:crypto';
import { createServer, type Server } from 'node:http';
import { mkdir, rename, writeFile } from 'node:fs/promises';
import path from 'node:path';

export interface WebhookCatcherOptions {
  dir: string;
  port: number;
  secret: string;
  host?: string;
  log?: (line: string) => void;
}

export interface WebhookCatcherHandle {
  readonly url: string;
  readonly dir: string;
  stop(): Promise<void>;
}

const MAX_BODY = 256 * 1024;

/**
 * The demo's stand-in for the issuer's upstream system: it receives the
 * product's outgoing events (card blocked / unblocked), checks their
 * signature (HMAC-SHA-256 of "<timestamp>.<body>", RFC 2104) and keeps each as
 * a JSON file, so a demo can show that a block reached "the card system".
 */
export async function startWebhookCatcher(o: WebhookCatcherOptions): Promise<WebhookCatcherHandle> {
  const dir = path.resolve(o.dir);
  await mkdir(dir, { recursive: true });
  const log = o.log ?? (() => undefined);
  const server: Server = createServer((req, res) => {
    if (req.method !== 'POST') {
      res.writeHead(405).end();
      return;
    }
    const chunks: Buffer[] = [];
    let size = 0;
    req.on('data', (c: Buffer) => {
      size += c.length;
      if (size > MAX_BODY) req.destroy();
      else chunks.push(c);
    });
    req.on('end', () => {
      const body = Buffer.concat(chunks).toString('utf8');
      const ts = String(req.headers['x-edgecase-timestamp'] ?? '');
      const sig = String(req.headers['x-edgecase-signature'] ?? '');
      const expected = createHmac('sha256', o.secret).update(`${ts}.${body}`).digest('hex');
      const ok = sig.length === expected.length && timingSafeEqual(Buffer.from(sig), Buffer.from(expected));
      if (!ok) {
        log('webhook catcher: refused an event with a bad signature');
        res.writeHead(401).end();
        return;
      }
      let id = `${Date.now()}`;
      try {
        id = String((JSON.parse(body) as { id?: number }).id ?? id);
      } catch {
        res.writeHead(400).end();
        return;
      }
      const file = path.join(dir, `event-${id}.json`);
      const tmp = `${file}.${process.pid}.tmp`;
      writeFile(tmp, JSON.stringify({ receivedAt: new Date().toISOString(), event: req.headers['x-edgecase-event'], body: JSON.parse(body) }, null, 2))
        .then(() => rename(tmp, file))
        .then(() => res.writeHead(204).end())
        .catch(() => res.writeHead(500).end());
    });
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(o.port, o.host ?? '127.0.0.1', () => resolve());
  });
  const addr = server.address();
  const port = typeof addr === 'object' && addr ? addr.port : o.port;
  log(`webhook catcher on 127.0.0.1:${port}, events kept in ${dir}`);
  return {
    url: `http://${o.host ?? '127.0.0.1'}:${port}/events`,
    dir,
    stop: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}
