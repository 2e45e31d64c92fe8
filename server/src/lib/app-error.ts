/**
 * The one application error type. Every expected failure (bad input, missing
 * rights, conflicts) is an AppError; anything else is a bug and answers 500.
 */
export interface FieldIssue {
  path: string;
  message: string;
}

export interface AppErrorOptions {
  status: number;
  code: string;
  message: string;
  fields?: FieldIssue[];
  retryAfterSeconds?: number;
  cause?: unknown;
  /** Extra headers to send with the error response. */
  headers?: Record<string, string>;
  /** Extra fields of the error body (e.g. who holds a case on a claim conflict). */
  extra?: Record<string, unknown>;
}

export class AppError extends Error {
  readonly status: number;
  readonly code: string;
  readonly fields?: FieldIssue[];
  readonly retryAfterSeconds?: number;
  readonly headers?: Record<string, string>;
  readonly extra?: Record<string, unknown>;

  constructor(options: AppErrorOptions) {
    super(options.message, { cause: options.cause });
    this.name = 'AppError';
    this.status = options.status;
    this.code = options.code;
    this.fields = options.fields;
    this.retryAfterSeconds = options.retryAfterSeconds;
    this.headers = options.headers;
    this.extra = options.extra;
  }

  static badRequest(message: string, fields?: FieldIssue[]): AppError {
    return new AppError({ status: 400, code: 'invalid_request', message, fields });
  }

  static unauthorized(message = 'Sign in to continue.'): AppError {
    return new AppError({ status: 401, code: 'unauthenticated', message });
  }

  static forbidden(message = 'Your role does not allow this.'): AppError {
    return new AppError({ status: 403, code: 'forbidden', message });
  }

  static notFound(message = 'Not found.'): AppError {
    return new AppError({ status: 404, code: 'not_found', message });
  }

  static conflict(message: string, code = 'conflict'): AppError {
    return new AppError({ status: 409, code, message });
  }

  static unavailable(message: string, retryAfterSeconds = 5): AppError {
    return new AppError({
      status: 503,
      code: 'unavailable',
      message,
      retryAfterSeconds,
      headers: { 'Retry-After': String(retryAfterSeconds) },
    });
  }
}
