import path from 'node:path';
import { z } from 'zod';

/**
 * Configuration, parsed once at boot. Every key has an environment name, a
 * default for the local demo, and a one-line doc. Bad configuration stops the
 * process with a readable message instead of failing later.
 */
const bool = z
  .enum(['true', 'false', '1', '0', 'yes', 'no'])
  .transform((v) => v === 'true' || v === '1' || v === 'yes');

const DEMO_SESSION_SECRET = 'edgecase-demo-session-secret-change-me';
const DEMO_PAN_KEY = 'edgecase-demo-pan-hmac-key-change-me';

const schema = z.object({
  /** Runtime mode: `demo` (local defaults allowed), `test`, or `production` (refuses demo secrets). */
  EDGECASE_MODE: z.enum(['demo', 'test', 'production']).default('demo'),
  /** HTTP port of the web server (API, built client, Socket.IO). */
  PORT: z.coerce.number().int().min(1).max(65535).default(3000),
  /** Address the web server binds to. */
  HOST: z.string().default('127.0.0.1'),
  /** Public URL people open; used in e-mailed links. */
  PUBLIC_URL: z.string().url().optional(),
  /** MariaDB host. */
  DB_HOST: z.string().default('127.0.0.1'),
  /** MariaDB port (the private instance, not a system one). */
  DB_PORT: z.coerce.number().int().min(1).max(65535).default(3307),
  /** Database name. */
  DB_NAME: z.string().default('edgecase'),
  /** Database user. */
  DB_USER: z.string().default('edgecase'),
  /** Database password. */
  DB_PASSWORD: z.string().default('edgecase'),
  /** Connection pool size per process. */
  DB_POOL_MAX: z.coerce.number().int().min(1).max(200).default(10),
  /** Redis host. */
  REDIS_HOST: z.string().default('127.0.0.1'),
  /** Redis port (the private instance). */
  REDIS_PORT: z.coerce.number().int().min(1).max(65535).default(6380),
  /** Prefix for every Redis key and BullMQ queue, so two copies can share one Redis. */
  REDIS_PREFIX: z.string().default('edgecase'),
  /** SMTP host that outgoing mail goes to (the local catcher in the demo). */
  SMTP_HOST: z.string().default('127.0.0.1'),
  /** SMTP port. */
  SMTP_PORT: z.coerce.number().int().min(1).max(65535).default(2525),
  /** Sender address on outgoing mail. */
  MAIL_FROM: z.string().default('Edgecase <no-reply@edgecase.demo.test>'),
  /** Folder the local SMTP catcher writes captured mail to; the demo mailbox reads it. Empty: no demo mailbox. */
  MAIL_CATCHER_DIR: z.string().default(''),
  /** Where events for the upstream system (card blocked/unblocked) are POSTed; empty: recorded, not delivered. */
  UPSTREAM_WEBHOOK_URL: z.string().default(''),
  /** Secret that signs outgoing webhooks (X-Edgecase-Signature). */
  UPSTREAM_WEBHOOK_SECRET: z.string().min(16).default('edgecase-demo-webhook-secret'),
  /** Folder for uploaded evidence, outside the web root. */
  UPLOAD_DIR: z.string().default(path.resolve('.data/demo/uploads')),
  /** Secret that signs session cookies. */
  SESSION_SECRET: z.string().min(16).default(DEMO_SESSION_SECRET),
  /** Idle timeout of a staff session, in minutes. */
  SESSION_IDLE_MINUTES: z.coerce.number().int().min(1).max(24 * 60).default(30),
  /** Set the Secure flag on cookies: on by default (and required) in production mode, off by default otherwise (plain-HTTP demo). */
  COOKIE_SECURE: bool.optional(),
  /** Trust X-Forwarded-* from a proxy in front (hop count). */
  TRUST_PROXY: z.coerce.number().int().min(0).max(10).default(0),
  /** Failed sign-ins per account before a lock-out. */
  LOGIN_MAX_FAILURES_PER_ACCOUNT: z.coerce.number().int().min(1).default(5),
  /** Lock-out length after too many failures, in minutes. */
  LOGIN_LOCKOUT_MINUTES: z.coerce.number().int().min(1).default(15),
  /** Failed sign-ins per client address per 15 minutes before it is slowed down. */
  LOGIN_MAX_FAILURES_PER_IP: z.coerce.number().int().min(1).default(50),
  /** Key for the keyed hash (HMAC-SHA-256) that lets card numbers be matched without being stored. */
  PAN_HMAC_KEY: z.string().min(16).default(DEMO_PAN_KEY),
  /** Folder of the built client served by the web server. */
  CLIENT_DIST: z.string().default(path.resolve('dist/client')),
  /** Log level for pino. */
  LOG_LEVEL: z.enum(['fatal', 'error', 'warn', 'info', 'debug', 'trace', 'silent']).default('info'),
  /** Password of the seeded demo accounts (demo mode only). */
  DEMO_PASSWORD: z.string().default('demo-password'),
  /** Days of invented history the demo seed back-fills at first start. */
  DEMO_HISTORY_DAYS: z.coerce.number().int().min(7).max(400).default(75),
  /** Invented cardholders of the demo issuer. */
  DEMO_CARDHOLDERS: z.coerce.number().int().min(50).max(100_000).default(3000),
  /** Cases a day the demo team can work; the demo seed sets the first alert threshold from it. */
  DEMO_DAILY_CAPACITY: z.coerce.number().int().min(1).max(100_000).default(40),
  /** Days a chargeback may take to arrive; training windows end this long ago. */
  LABEL_DELAY_DAYS: z.coerce.number().int().min(0).max(180).default(21),
});

export type Config = Omit<z.infer<typeof schema>, 'COOKIE_SECURE'> & { COOKIE_SECURE: boolean; publicUrl: string };

export function loadConfig(env: NodeJS.ProcessEnv = process.env): Config {
  const parsed = schema.safeParse(env);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `  ${i.path.join('.')}: ${i.message}`);
    throw new Error(`Invalid configuration:\n${lines.join('\n')}`);
  }
  const c = parsed.data;
  if (c.EDGECASE_MODE === 'production') {
    const bad: string[] = [];
    if (c.SESSION_SECRET === DEMO_SESSION_SECRET) bad.push('SESSION_SECRET');
    if (c.PAN_HMAC_KEY === DEMO_PAN_KEY) bad.push('PAN_HMAC_KEY');
    if (env.DB_PASSWORD === undefined) bad.push('DB_PASSWORD');
    if (bad.length > 0) {
      throw new Error(`Invalid configuration: production mode refuses the demo defaults of ${bad.join(', ')}`);
    }
    // A session cookie without Secure can be read off any plain-HTTP request (OWASP ASVS 4.0 V3.4.1).
    if (c.COOKIE_SECURE === false) throw new Error('Invalid configuration: production mode needs Secure cookies; remove COOKIE_SECURE=false and serve over TLS');
  }
  const cookieSecure = c.COOKIE_SECURE ?? c.EDGECASE_MODE === 'production';
  return { ...c, COOKIE_SECURE: cookieSecure, publicUrl: c.PUBLIC_URL ?? `http://${c.HOST === '0.0.0.0' ? 'localhost' : c.HOST}:${c.PORT}` };
}

let cached: Config | undefined;
/** The process-wide configuration, parsed on first use. */
export function config(): Config {
  cached ??= loadConfig();
  return cached;
}
