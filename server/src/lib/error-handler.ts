import type { ErrorRequestHandler, RequestHandler } from 'express';
import { AppError } from './app-error';
import { logger } from './logger';

interface HttpLikeError {
  status?: number;
  statusCode?: number;
  type?: string;
  code?: string;
  expose?: boolean;
  message?: string;
}

/**
 * MariaDB errors that mean the connection went away mid-request (server shut
 * down or restarted, socket closed): SQLSTATE class 08 (connection exception),
 * the driver's fatal flag, or ER_SERVER_SHUTDOWN (1053) / ER_CONNECTION_KILLED
 * (1927) / CR_SERVER_GONE_ERROR (2006) / CR_SERVER_LOST (2013). A retry is
 * safe: ingest recognises ids it already holds, and the requeue sweeper scores
 * anything that was stored but not queued.
 */
function lostDatabaseConnection(err: unknown): boolean {
  const p = (err as { parent?: { sqlState?: string; fatal?: boolean; errno?: number } })?.parent;
  if (!p) return false;
  return p.fatal === true || (typeof p.sqlState === 'string' && p.sqlState.startsWith('08')) || [1053, 1927, 2006, 2013].includes(p.errno ?? 0);
}

/** Maps errors thrown by middleware we use (body-parser, csrf-sync) to AppErrors. */
function normalise(err: unknown): AppError {
  if (err instanceof AppError) return err;
  const e = (err ?? {}) as HttpLikeError;
  const status = e.status ?? e.statusCode;
  if (e.type === 'entity.parse.failed') {
    return new AppError({ status: 400, code: 'malformed_json', message: 'The request body is not valid JSON.' });
  }
  if (e.type === 'entity.too.large') {
    return new AppError({ status: 413, code: 'payload_too_large', message: 'The request body is too large.' });
  }
  if (e.code === 'EBADCSRFTOKEN') {
    return new AppError({ status: 403, code: 'csrf_invalid', message: 'The form has expired. Reload and try again.' });
  }
  // The database or Redis is unreachable: a transient refusal, never a 500.
  const name = (err as { name?: string })?.name ?? '';
  if (
    name.startsWith('SequelizeConnection') ||
    lostDatabaseConnection(err) ||
    name === 'ConnectionAcquireTimeoutError' ||
    name === 'SequelizeHostNotReachableError' ||
    name === 'MaxRetriesPerRequestError' ||
    /Connection is closed|Stream isn't writeable|ECONNREFUSED|enableOfflineQueue/.test(e.message ?? '')
  ) {
    return AppError.unavailable('A service the request needs is unavailable; nothing was changed. Retry shortly.', 2);
  }
  if (typeof status === 'number' && status >= 400 && status < 500) {
    return new AppError({ status, code: e.type ?? 'invalid_request', message: e.expose && e.message ? e.message : 'Bad request.' });
  }
  return new AppError({ status: 500, code: 'internal', message: 'Something went wrong on our side.', cause: err });
}

/** The one error-handling middleware: JSON errors, 5xx logged with the stack, never a crash. */
export const errorHandler: ErrorRequestHandler = (err, req, res, _next) => {
  const appError = normalise(err);
  if (appError.status >= 500) {
    logger().error({ err, method: req.method, path: req.path }, 'request failed');
  }
  if (res.headersSent) return;
  if (appError.headers) res.set(appError.headers);
  res.status(appError.status).json({
    error: {
      code: appError.code,
      message: appError.message,
      ...(appError.fields ? { fields: appError.fields } : {}),
      ...(appError.retryAfterSeconds !== undefined ? { retryAfterSeconds: appError.retryAfterSeconds } : {}),
      ...(appError.extra ?? {}),
    },
  });
};

export const notFoundHandler: RequestHandler = (_req, _res, next) => {
  next(AppError.notFound('No such API route.'));
};
