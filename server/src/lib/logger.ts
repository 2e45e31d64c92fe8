import pino, { type Logger } from 'pino';
import { config } from '../config/index';

/**
 * Structured logs. Secrets and anything that could hold a card number are
 * redacted by path, and free text is scrubbed of long digit runs, so a log line
 * can never carry a PAN even when a caller slips one into a message.
 */
const REDACT_PATHS = [
  'password',
  '*.password',
  'req.headers.authorization',
  'req.headers.cookie',
  'req.headers["x-csrf-token"]',
  'res.headers["set-cookie"]',
  'card.number',
  '*.card.number',
  'pan',
  '*.pan',
  'csrfToken',
  '*.csrfToken',
  'apiKey',
  '*.apiKey',
];

const DIGIT_RUN = /\d(?:[ -]?\d){11,18}/g;

/** Replaces every run of 12-19 digits (optionally spaced) with a marker. */
export function scrubDigits(text: string): string {
  return text.replace(DIGIT_RUN, '[digits removed]');
}

/**
 * A copy of what a caller logs with every string scrubbed, at any depth (an
 * error's message, a URL, a SQL statement inside an object): scrubbing only the
 * message would let a card number through in a field.
 */
export function scrubLogValue(value: unknown, depth = 0): unknown {
  if (typeof value === 'string') return scrubDigits(value);
  if (value === null || typeof value !== 'object' || depth > 6) return value;
  if (value instanceof Error) return scrubLogValue(pino.stdSerializers.err(value), depth + 1);
  if (Array.isArray(value)) return value.map((v) => scrubLogValue(v, depth + 1));
  if (value instanceof Date || Buffer.isBuffer(value)) return value;
  const out: Record<string, unknown> = {};
  for (const [k, v] of Object.entries(value)) out[k] = scrubLogValue(v, depth + 1);
  return out;
}

export function createLogger(name: string): Logger {
  const c = config();
  return pino({
    name,
    level: c.EDGECASE_MODE === 'test' && process.env.LOG_LEVEL === undefined ? 'warn' : c.LOG_LEVEL,
    redact: { paths: REDACT_PATHS, censor: '[redacted]' },
    hooks: {
      logMethod(args, method) {
        const scrubbed = args.map((a) => (typeof a === 'string' ? scrubDigits(a) : a)) as typeof args;
        method.apply(this, scrubbed);
      },
    },
    formatters: {
      log: (object) => scrubLogValue(object) as Record<string, unknown>,
    },
    serializers: {
      // The log formatter has already turned a logged error into a plain, scrubbed object; one reaching here otherwise is serialised now.
      err: (err: unknown) => scrubLogValue(err instanceof Error ? pino.stdSerializers.err(err) : err),
    },
  });
}

let root: Logger | undefined;
export function logger(): Logger {
  root ??= createLogger(process.env.EDGECASE_PROCESS ?? 'edgecase');
  return root;
}
