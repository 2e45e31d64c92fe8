import { vi } from 'vitest';

export type StubRequest = { method: string; path: string; headers: Record<string, string>; body: unknown };
export type StubResponse = { status: number; body?: unknown };
type Handler = StubResponse | ((request: StubRequest) => StubResponse);

/**
 * Replaces global fetch with a table of "METHOD /path" answers. Calls nobody
 * planned for are recorded and answered 501, so a test that reaches an
 * unexpected endpoint shows it instead of hanging.
 */
export function stubFetch(routes: Record<string, Handler>) {
  const calls: StubRequest[] = [];
  const unexpected: string[] = [];
  const fetchMock = vi.fn(async (input: RequestInfo | URL, init: RequestInit = {}) => {
    const url = new URL(typeof input === 'string' ? input : input instanceof URL ? input.href : input.url, 'http://localhost');
    const method = (init.method ?? 'GET').toUpperCase();
    const headers: Record<string, string> = {};
    new Headers(init.headers).forEach((value, key) => (headers[key] = value));
    const body = typeof init.body === 'string' ? JSON.parse(init.body) : undefined;
    const request = { method, path: url.pathname, headers, body };
    calls.push(request);
    const handler = routes[`${method} ${url.pathname}`];
    if (!handler) {
      unexpected.push(`${method} ${url.pathname}`);
      return json(501, { error: { code: 'unstubbed', message: `No stub for ${method} ${url.pathname}` } });
    }
    const answer = typeof handler === 'function' ? handler(request) : handler;
    return json(answer.status, answer.body);
  });
  vi.stubGlobal('fetch', fetchMock);
  return {
    calls,
    unexpected,
    callsTo: (method: string, path: string) => calls.filter((c) => c.method === method && c.path === path),
  };
}

function json(status: number, body: unknown): Response {
  if (status === 204 || body === undefined) return new Response(null, { status });
  return new Response(JSON.stringify(body), { status, headers: { 'Content-Type': 'application/json' } });
}

export const users = {
  investigator: { id: 1, email: 'ines@fernhollow.example', displayName: 'Ines Marlow', role: 'investigator' },
  supervisor: { id: 2, email: 'sam@fernhollow.example', displayName: 'Sam Okafor', role: 'supervisor' },
  data_scientist: { id: 3, email: 'dara@fernhollow.example', displayName: 'Dara Quill', role: 'data_scientist' },
  admin: { id: 4, email: 'ada@fernhollow.example', displayName: 'Ada Brook', role: 'admin' },
} as const;

export const CSRF = 'csrf-token-0123456789abcdef';

/** Answers for a signed-in session of `role`. */
export function signedInRoutes(role: keyof typeof users): Record<string, Handler> {
  return {
    'GET /api/auth/me': { status: 200, body: { user: users[role] } },
    'GET /api/auth/csrf': { status: 200, body: { csrfToken: CSRF } },
  };
}

export const signedOutRoutes: Record<string, Handler> = {
  'GET /api/auth/me': { status: 401, body: { error: { code: 'unauthenticated', message: 'Sign in first.' } } },
  'GET /api/auth/csrf': { status: 200, body: { csrfToken: CSRF } },
  'GET /api/demo/info': { status: 404, body: { error: { code: 'not_found', message: 'Not found' } } },
};
