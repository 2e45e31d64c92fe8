import type { RequestHandler } from 'express';
import { logger, scrubDigits } from './logger';

/**
 * The access log of the upstream API (/api/v1): only answers of 400 and above are written, in the
 * shape of the console's access lines (req, res, responseTime). Accepted ingest and decisions are
 * counted in the database, not in the log; pino-http's child logger per request cost about 6 % of
 * the web server's CPU on this path. 5xx answers are logged at error (their stack by the error handler).
 */
export const logUpstreamRefusals: RequestHandler = (req, res, next) => {
  const started = performance.now();
  res.once('finish', () => {
    if (res.statusCode < 400) return;
    const line = {
      req: { method: req.method, url: scrubDigits(req.originalUrl.split('?')[0]) },
      res: { statusCode: res.statusCode },
      responseTime: Math.round(performance.now() - started),
    };
    if (res.statusCode >= 500) logger().error(line, 'request errored');
    else logger().info(line, 'request completed');
  });
  next();
};
