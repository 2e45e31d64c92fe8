import type { z } from 'zod';
import { apiErrorSchema, CSRF_HEADER, csrfResponseSchema } from '@shared/api/auth';

type FieldError = { path: string; message: string };

/** An API call that did not succeed, carrying what the server said about it. */
export class ApiError extends Error {
  readonly status: number;
  readonly code: string;
  readonly fields: FieldError[] | undefined;
  readonly retryAfterSeconds: number | undefined;
  /**
   * The whole `error` object as the server sent it, so endpoint-specific
   * fields (e.g. `claimedBy` on a claim conflict) survive the common parse.
   */
  readonly details: Readonly<Record<string, unknown>> | undefined;

  constructor(options: {
    status: number;
    code: string;
    message: string;
    fields?: FieldError[];
    retryAfterSeconds?: number;
    details?: Record<string, unknown>;
  }) {
    super(options.message);
    this.name = 'ApiError';
    this.status = options.status;
    this.code = options.code;
    this.fields = options.fields;
    this.retryAfterSeconds = options.retryAfterSeconds;
    this.details = options.details;
  }

  /** 4xx: retrying the same request will not change the answer. */
  get isClientError(): boolean {
    return this.status >= 400 && this.status < 500;
  }
}

export function isApiError(error: unknown): error is ApiError {
  return error instanceof ApiError;
}

const UNSAFE_METHODS = new Set(['POST', 'PUT', 'PATCH', 'DELETE']);

// The synchronizer token lives only in memory: it is bound to the session, and
// the session cookie is the thing the browser keeps.
let csrfToken: string | null = null;
let csrfInFlight: Promise<string> | null = null;

export function setCsrfToken(token: string | null): void {
  csrfToken = token;
}

async function fetchCsrfToken(): Promise<string> {
  // Concurrent mutations share one token request instead of racing each other.
  csrfInFlight ??= (async () => {
    try {
      const body = await send('/api/auth/csrf', { method: 'GET' });
      const token = csrfResponseSchema.parse(body).csrfToken;
      csrfToken = token;
      return token;
    } finally {
      csrfInFlight = null;
    }
  })();
  return csrfInFlight;
}

async function send(path: string, init: RequestInit): Promise<unknown> {
  let response: Response;
  try {
    response = await fetch(path, { credentials: 'same-origin', ...init });
  } catch (cause) {
    if (cause instanceof DOMException && cause.name === 'AbortError') throw cause;
    throw new ApiError({
      status: 0,
      code: 'network_error',
      message: 'Cannot reach the server. Check the connection and try again.',
    });
  }
  if (response.status === 204) return undefined;

  const text = await response.text();
  let body: unknown = undefined;
  if (text) {
    try {
      body = JSON.parse(text);
    } catch {
      body = undefined;
    }
  }
  if (response.ok) return body;

  const parsed = apiErrorSchema.safeParse(body);
  if (parsed.success) {
    const details = (body as { error: Record<string, unknown> }).error;
    throw new ApiError({ status: response.status, ...parsed.data.error, details });
  }
  throw new ApiError({
    status: response.status,
    code: `http_${response.status}`,
    message: response.statusText || `The server answered ${response.status}.`,
  });
}

export type RequestOptions<T> = {
  method?: 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';
  /** Sent as JSON; a FormData goes as multipart, its boundary set by the browser. */
  body?: unknown;
  /** When given, the response is checked against it; a mismatch is a bug, so it throws. */
  schema?: z.ZodType<T>;
  signal?: AbortSignal;
};

/**
 * Calls the Edgecase API. Unsafe methods carry the CSRF token; when the server
 * says the token is stale (after a session change) the token is fetched again
 * and the call retried once.
 */
export async function apiRequest<T = unknown>(path: string, options: RequestOptions<T> = {}): Promise<T> {
  const method = options.method ?? 'GET';
  const unsafe = UNSAFE_METHODS.has(method);

  const attempt = async (token: string | null) => {
    const headers: Record<string, string> = { Accept: 'application/json' };
    const multipart = options.body instanceof FormData;
    if (options.body !== undefined && !multipart) headers['Content-Type'] = 'application/json';
    if (token) headers[CSRF_HEADER] = token;
    return send(path, {
      method,
      headers,
      body: options.body === undefined ? undefined : multipart ? (options.body as FormData) : JSON.stringify(options.body),
      signal: options.signal,
    });
  };

  let body: unknown;
  if (unsafe) {
    const token = csrfToken ?? (await fetchCsrfToken());
    try {
      body = await attempt(token);
    } catch (error) {
      if (!(isApiError(error) && error.status === 403 && error.code === 'csrf_invalid')) throw error;
      csrfToken = null;
      body = await attempt(await fetchCsrfToken());
    }
  } else {
    body = await attempt(null);
  }
  return options.schema ? options.schema.parse(body) : (body as T);
}

export const api = {
  get: <T>(path: string, options: Omit<RequestOptions<T>, 'method' | 'body'> = {}) =>
    apiRequest<T>(path, { ...options, method: 'GET' }),
  post: <T>(path: string, body?: unknown, options: Omit<RequestOptions<T>, 'method' | 'body'> = {}) =>
    apiRequest<T>(path, { ...options, method: 'POST', body }),
  put: <T>(path: string, body?: unknown, options: Omit<RequestOptions<T>, 'method' | 'body'> = {}) =>
    apiRequest<T>(path, { ...options, method: 'PUT', body }),
  patch: <T>(path: string, body?: unknown, options: Omit<RequestOptions<T>, 'method' | 'body'> = {}) =>
    apiRequest<T>(path, { ...options, method: 'PATCH', body }),
  delete: <T>(path: string, options: Omit<RequestOptions<T>, 'method' | 'body'> = {}) =>
    apiRequest<T>(path, { ...options, method: 'DELETE' }),
};
