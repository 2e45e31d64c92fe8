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
    serializers: {
      err: pino.stdSerializers.err,
    },
  });
}

let root: Logger | undefined;
export function logger(): Logger {
  root ??= createLogger(process.env.EDGECASE_PROCESS ?? 'edgecase');
  return root;
}
