import { randomBytes } from 'node:crypto';
import { mkdir, rename, writeFile } from 'node:fs/promises';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import { simpleParser } from 'mailparser';
import { SMTPServer } from 'smtp-server';
import type { Logger } from './log';

/** One captured message as written to `<dir>/<id>.json`; the raw message is `<dir>/<id>.eml`. */
export interface CaughtMail {
  id: string;
  receivedAt: string;
  from: string;
  /** Envelope recipients, so Bcc shows too. */
  to: string[];
  subject: string;
  text: string;
  html: string | null;
  attachments: { filename: string; contentType: string; size: number }[];
}

export interface SmtpCatcherOptions {
  dir: string;
  port: number;
  host?: string;
  /** Largest accepted message in bytes. */
  maxBytes?: number;
  log?: Logger;
}

export interface SmtpCatcherHandle {
  readonly port: number;
  readonly dir: string;
  stop(): Promise<void>;
}

/** Readers list the folder while we write: they must only ever see complete files. */
async function writeAtomically(file: string, data: string | Buffer): Promise<void> {
  const tmp = path.join(path.dirname(file), `.${path.basename(file)}.${process.pid}.tmp`);
  await writeFile(tmp, data);
  await rename(tmp, file);
}

/**
 * A local SMTP server that accepts every message (no auth, no TLS) and keeps
 * it as files, so the demo can show outgoing mail without sending any.
 */
export async function startSmtpCatcher(opts: SmtpCatcherOptions): Promise<SmtpCatcherHandle> {
  const dir = path.resolve(opts.dir);
  const log = opts.log ?? (() => undefined);
  await mkdir(dir, { recursive: true });
  const maxBytes = opts.maxBytes ?? 25 * 1024 * 1024;

  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS'],
    banner: 'Edgecase local mail catcher',
    size: maxBytes,
    logger: false,
    // Open client connections (nodemailer pools) must not hold up Ctrl-C for the default 30 s.
    closeTimeout: 2_000,
    onData(stream, session, callback) {
      const chunks: Buffer[] = [];
      stream.on('data', (c: Buffer) => chunks.push(c));
      stream.on('error', callback);
      stream.on('end', () => {
        if ((stream as unknown as { sizeExceeded?: boolean }).sizeExceeded) {
          callback(Object.assign(new Error('Message too large'), { responseCode: 552 }));
          return;
        }
        const raw = Buffer.concat(chunks);
        void (async () => {
          const parsed = await simpleParser(raw);
          const id = `${Date.now()}-${randomBytes(4).toString('hex')}`;
          const envelopeFrom = session.envelope.mailFrom;
          const mail: CaughtMail = {
            id,
            receivedAt: new Date().toISOString(),
            from: parsed.from?.text ?? (envelopeFrom ? envelopeFrom.address : ''),
            to: session.envelope.rcptTo.map((r) => r.address),
            subject: parsed.subject ?? '',
            text: parsed.text ?? '',
            html: typeof parsed.html === 'string' ? parsed.html : null,
            attachments: parsed.attachments.map((a) => ({ filename: a.filename ?? '', contentType: a.contentType, size: a.size })),
          };
          // The .eml first: whoever sees the .json may open the raw message straight away.
          await writeAtomically(path.join(dir, `${id}.eml`), raw);
          await writeAtomically(path.join(dir, `${id}.json`), `${JSON.stringify(mail, null, 2)}\n`);
          log(`caught mail ${id} to ${mail.to.join(', ')}`);
        })().then(
          () => callback(),
          (e: unknown) => callback(e instanceof Error ? e : new Error(String(e))),
        );
      });
    },
  });
  server.on('error', (e) => log(`SMTP catcher error: ${e.message}`));

  await new Promise<void>((resolve, reject) => {
    const onError = (e: Error) => reject(new Error(`SMTP catcher: cannot listen on ${opts.host ?? '127.0.0.1'}:${opts.port} (${e.message})`));
    server.once('error', onError);
    server.listen(opts.port, opts.host ?? '127.0.0.1', () => {
      server.off('error', onError);
      resolve();
    });
  });
  log(`SMTP catcher on 127.0.0.1:${opts.port}, mail kept in ${dir}`);

  return {
    port: opts.port,
    dir,
    stop: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}

// Also usable on its own: `npx tsx scripts/services/smtp-catcher.ts --dir .data/mail --port 2525`.
if (process.argv[1] && import.meta.url === pathToFileURL(path.resolve(process.argv[1])).href) {
  const arg = (name: string) => {
    const i = process.argv.indexOf(`--${name}`);
    return i > 0 ? process.argv[i + 1] : undefined;
  };
  const handle = await startSmtpCatcher({
    dir: arg('dir') ?? process.env.MAIL_CATCHER_DIR ?? '.data/mail',
    port: Number(arg('port') ?? process.env.SMTP_PORT ?? 2525),
    log: (m) => console.log(m),
  });
  const shutdown = () => void handle.stop().then(() => process.exit(0));
  process.once('SIGINT', shutdown);
  process.once('SIGTERM', shutdown);
}
