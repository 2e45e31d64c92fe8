/**
 * The web server and the workers as real child processes (the entry points
 * that ship), against the integration run's MariaDB and Redis, each writing
 * its log to a file; a local SMTP catcher and a webhook receiver in this
 * process. The card-data and secrets scans read what these processes wrote.
 */
import { randomUUID } from 'node:crypto';
import { mkdtemp, readdir, readFile } from 'node:fs/promises';
import { createServer, type IncomingMessage } from 'node:http';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { spawnChild, type ChildHandle } from '../../../scripts/services/child';
import { startSmtpCatcher, type SmtpCatcherHandle } from '../../../scripts/services/smtp-catcher';
import { tsxCommand } from '../../../scripts/services/stack';
import { waitForHttp, waitUntil } from '../../../scripts/services/wait';
import { loadConfig } from '../../../server/src/config/index';
import { openDatabase, type Database } from '../../../server/src/db/database';
import { freePort } from '../helpers/net';
import { fakeClientDist } from './helpers';

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../..');

export interface RealStack {
  baseUrl: string;
  env: NodeJS.ProcessEnv;
  /** This test's own connection to the database the processes use. */
  db: Database;
  logsDir: string;
  mailDir: string;
  uploadDir: string;
  /** Bodies and headers of the webhooks the outgoing worker delivered. */
  webhooks: { headers: IncomingMessage['headers']; body: string }[];
  /** Every file the processes logged to, with its text. */
  logs(): Promise<{ file: string; text: string }[]>;
  stop(): Promise<void>;
}

/**
 * Starts web and worker processes with `env` on top of the test settings.
 * `beforeStart` runs once the database connection is open (install a champion there).
 */
export async function startRealStack(name: string, env: Record<string, string>, beforeStart?: (db: Database) => Promise<void>): Promise<RealStack> {
  const work = await mkdtemp(path.join(tmpdir(), `edgecase-${name}-`));
  const logsDir = path.join(work, 'logs');
  const mailDir = path.join(work, 'mail');
  const uploadDir = path.join(work, 'uploads');
  const catcher: SmtpCatcherHandle = await startSmtpCatcher({ dir: mailDir, port: await freePort() });
  const webhooks: RealStack['webhooks'] = [];
  const receiver = createServer((req, res) => {
    let body = '';
    req.on('data', (c: Buffer) => (body += c.toString()));
    req.on('end', () => {
      webhooks.push({ headers: req.headers, body });
      res.writeHead(204).end();
    });
  });
  const receiverPort = await freePort();
  await new Promise<void>((resolve) => receiver.listen(receiverPort, '127.0.0.1', resolve));
  const port = await freePort();

  const childEnv: NodeJS.ProcessEnv = {
    ...process.env,
    EDGECASE_MODE: 'test',
    PORT: String(port),
    HOST: '127.0.0.1',
    REDIS_PREFIX: `sec-${name}-${randomUUID().slice(0, 8)}`,
    SMTP_HOST: '127.0.0.1',
    SMTP_PORT: String(catcher.port),
    MAIL_CATCHER_DIR: mailDir,
    UPLOAD_DIR: uploadDir,
    CLIENT_DIST: await fakeClientDist(),
    UPSTREAM_WEBHOOK_URL: `http://127.0.0.1:${receiverPort}/edgecase-events`,
    PUBLIC_URL: `http://127.0.0.1:${port}`,
    // Everything the processes can say, SQL statements included (they log those at trace).
    LOG_LEVEL: 'trace',
    ...env,
  };
  // Vitest's own markers and loader flags must not reach the app processes.
  for (const k of ['VITEST', 'VITEST_POOL_ID', 'VITEST_WORKER_ID', 'NODE_OPTIONS', 'TEST']) delete childEnv[k];

  const db = openDatabase(loadConfig(childEnv));
  const children: ChildHandle[] = [];
  const stop = async () => {
    for (const c of [...children].reverse()) await c.stop(15_000);
    await catcher.stop();
    await new Promise<void>((resolve) => receiver.close(() => resolve()));
    await db.close().catch(() => undefined);
  };
  try {
    await beforeStart?.(db);
    const spawn = (proc: string, script: string) =>
      spawnChild({ name: proc, ...tsxCommand(ROOT, script), cwd: ROOT, env: { ...childEnv, EDGECASE_PROCESS: proc }, logFile: path.join(logsDir, `${proc}.log`), echo: 'none' });
    children.push(spawn('web', 'server/src/index.ts'), spawn('workers', 'workers/src/index.ts'));
    const dead = () => {
      const c = children.find((x) => x.exitInfo);
      return c ? `${c.name} exited: ${c.recentOutput().slice(-800)}` : undefined;
    };
    const baseUrl = `http://127.0.0.1:${port}`;
    await waitForHttp(`${baseUrl}/api/health`, { timeoutMs: 90_000, failFast: dead });
    await waitUntil('workers running', async () => (await readFile(path.join(logsDir, 'workers.log'), 'utf8').catch(() => '')).includes('workers running'), { timeoutMs: 90_000, failFast: dead });
    return {
      baseUrl,
      env: childEnv,
      db,
      logsDir,
      mailDir,
      uploadDir,
      webhooks,
      async logs() {
        const files = (await readdir(logsDir)).filter((f) => f.endsWith('.log'));
        return Promise.all(files.map(async (f) => ({ file: f, text: await readFile(path.join(logsDir, f), 'utf8') })));
      },
      stop,
    };
  } catch (e) {
    await stop();
    throw e;
  }
}
