import { describe, expect, it } from 'vitest';
import { z } from 'zod';
import { api, ApiError, setCsrfToken } from '@/lib/api-client';
import { shouldRetry } from '@/lib/query-client';
import { stubFetch } from './support/fetch-stub';

describe('api client', () => {
  it('sends no CSRF token on GET, and fetches one once for unsafe methods', async () => {
    const stub = stubFetch({
      'GET /api/things': { status: 200, body: { ok: true } },
      'GET /api/auth/csrf': { status: 200, body: { csrfToken: 'token-aaaaaaaaaaaaaaaa' } },
      'POST /api/things': { status: 201, body: { id: 1 } },
      'DELETE /api/things': { status: 204 },
    });
    expect(await api.get('/api/things')).toEqual({ ok: true });
    expect(stub.calls[0].headers['x-csrf-token']).toBeUndefined();

    expect(await api.post('/api/things', { a: 1 })).toEqual({ id: 1 });
    expect(await api.delete('/api/things')).toBeUndefined();
    expect(stub.callsTo('GET', '/api/auth/csrf')).toHaveLength(1);
    expect(stub.callsTo('POST', '/api/things')[0].headers).toMatchObject({
      'x-csrf-token': 'token-aaaaaaaaaaaaaaaa',
      'content-type': 'application/json',
    });
    expect(stub.callsTo('DELETE', '/api/things')[0].headers['x-csrf-token']).toBe('token-aaaaaaaaaaaaaaaa');
  });

  it('sends credentials with every call', async () => {
    stubFetch({ 'GET /api/things': { status: 200, body: {} } });
    await api.get('/api/things');
    const init = (fetch as unknown as { mock: { calls: [string, RequestInit][] } }).mock.calls[0][1];
    expect(init.credentials).toBe('same-origin');
  });

  it('refreshes a stale CSRF token and retries exactly once', async () => {
    setCsrfToken('stale-token-from-before-sign-in');
    let tokens = 0;
    const stub = stubFetch({
      'GET /api/auth/csrf': () => ({ status: 200, body: { csrfToken: `fresh-token-${++tokens}-aaaaaaaa` } }),
      'POST /api/things': (req) =>
        req.headers['x-csrf-token'] === 'fresh-token-1-aaaaaaaa'
          ? { status: 200, body: { saved: true } }
          : { status: 403, body: { error: { code: 'csrf_invalid', message: 'Stale token' } } },
    });
    expect(await api.post('/api/things', {})).toEqual({ saved: true });
    expect(stub.callsTo('POST', '/api/things').map((c) => c.headers['x-csrf-token'])).toEqual([
      'stale-token-from-before-sign-in',
      'fresh-token-1-aaaaaaaa',
    ]);
  });

  it('gives up after one retry when the token keeps being refused', async () => {
    const stub = stubFetch({
      'GET /api/auth/csrf': { status: 200, body: { csrfToken: 'token-bbbbbbbbbbbbbbbb' } },
      'POST /api/things': { status: 403, body: { error: { code: 'csrf_invalid', message: 'Stale token' } } },
    });
    await expect(api.post('/api/things', {})).rejects.toMatchObject({ status: 403, code: 'csrf_invalid' });
    expect(stub.callsTo('POST', '/api/things')).toHaveLength(2);
  });

  it('does not retry other 403s', async () => {
    const stub = stubFetch({
      'GET /api/auth/csrf': { status: 200, body: { csrfToken: 'token-cccccccccccccccc' } },
      'POST /api/things': { status: 403, body: { error: { code: 'forbidden', message: 'Not for your role' } } },
    });
    await expect(api.post('/api/things', {})).rejects.toMatchObject({ code: 'forbidden' });
    expect(stub.callsTo('POST', '/api/things')).toHaveLength(1);
  });

  it('turns error bodies into ApiError with fields and retry time', async () => {
    stubFetch({
      'GET /api/auth/csrf': { status: 200, body: { csrfToken: 'token-dddddddddddddddd' } },
      'POST /api/locked': {
        status: 423,
        body: { error: { code: 'account_locked', message: 'Locked', retryAfterSeconds: 600, fields: [{ path: 'email', message: 'x' }] } },
      },
      'GET /api/broken': { status: 502 },
    });
    const error = await api.post('/api/locked', {}).catch((e: unknown) => e);
    expect(error).toBeInstanceOf(ApiError);
    expect(error).toMatchObject({ status: 423, code: 'account_locked', message: 'Locked', retryAfterSeconds: 600 });
    expect((error as ApiError).fields).toEqual([{ path: 'email', message: 'x' }]);

    await expect(api.get('/api/broken')).rejects.toMatchObject({ status: 502, code: 'http_502' });
  });

  it('reports an unreachable server as a network error', async () => {
    stubFetch({});
    (fetch as unknown as { mockImplementationOnce: (f: () => Promise<never>) => void }).mockImplementationOnce(() =>
      Promise.reject(new TypeError('Failed to fetch')),
    );
    await expect(api.get('/api/things')).rejects.toMatchObject({ status: 0, code: 'network_error' });
  });

  it('checks responses against a schema when given one', async () => {
    stubFetch({ 'GET /api/things': { status: 200, body: { count: 'three' } } });
    await expect(api.get('/api/things', { schema: z.object({ count: z.number() }) })).rejects.toThrow();
  });
});

describe('query retry policy', () => {
  it('never retries a 4xx, retries other failures twice', () => {
    const notFound = new ApiError({ status: 404, code: 'not_found', message: '' });
    const unavailable = new ApiError({ status: 503, code: 'unavailable', message: '' });
    expect(shouldRetry(0, notFound)).toBe(false);
    expect(shouldRetry(0, unavailable)).toBe(true);
    expect(shouldRetry(1, unavailable)).toBe(true);
    expect(shouldRetry(2, unavailable)).toBe(false);
    expect(shouldRetry(0, new TypeError('x'))).toBe(true);
  });
});
