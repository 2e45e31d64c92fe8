import { describe, expect, it } from 'vitest';
import { api, isApiError } from '@/lib/api-client';
import { stubFetch } from './support/fetch-stub';

type FetchMock = { mock: { calls: [string, RequestInit][] } };

describe('api client: multipart bodies and error details', () => {
  it('sends FormData as is, with the CSRF token and without a JSON content type', async () => {
    stubFetch({
      'GET /api/auth/csrf': { status: 200, body: { csrfToken: 'token-eeeeeeeeeeeeeeee' } },
      'POST /api/upload': { status: 201, body: { ok: true } },
    });
    const form = new FormData();
    form.append('file', new File(['a,b\n1,2\n'], 'rows.csv', { type: 'text/csv' }));
    expect(await api.post('/api/upload', form)).toEqual({ ok: true });

    const [, init] = (fetch as unknown as FetchMock).mock.calls.find(([url]) => url === '/api/upload')!;
    expect(init.body).toBe(form);
    const headers = new Headers(init.headers);
    expect(headers.get('content-type')).toBeNull();
    expect(headers.get('x-csrf-token')).toBe('token-eeeeeeeeeeeeeeee');
  });

  it('keeps endpoint-specific error fields in details', async () => {
    stubFetch({
      'GET /api/auth/csrf': { status: 200, body: { csrfToken: 'token-ffffffffffffffff' } },
      'POST /api/cases/7/claim': {
        status: 409,
        body: { error: { code: 'already_claimed', message: 'Claimed', claimedBy: { id: 9, displayName: 'Noor Vance' } } },
      },
    });
    const error = await api.post('/api/cases/7/claim').catch((e: unknown) => e);
    expect(isApiError(error)).toBe(true);
    if (!isApiError(error)) return;
    expect(error.code).toBe('already_claimed');
    expect(error.details?.claimedBy).toEqual({ id: 9, displayName: 'Noor Vance' });
  });
});
