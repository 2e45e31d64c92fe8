import { describe, expect, it } from 'vitest';
import express, { type RequestHandler } from 'express';
import helmet from 'helmet';
import request from 'supertest';
import { fixedHeaders } from '../../../server/src/lib/fixed-headers';

/** Two apps answering the same JSON, one behind helmet itself and one behind its frozen headers. */
function appWith(mw: RequestHandler) {
  const app = express();
  app.use(mw);
  app.get('/x', (_req, res) => res.json({ ok: true }));
  return app;
}

const without = (h: Record<string, string>, ...names: string[]) => Object.fromEntries(Object.entries(h).filter(([k]) => !names.includes(k)));

describe('fixedHeaders', () => {
  it.each([
    ['defaults', {}],
    ['a CSP with directives and HSTS off', { contentSecurityPolicy: { directives: { 'default-src': ["'self'"], 'frame-ancestors': ["'none'"] } }, strictTransportSecurity: false }],
  ])('sets exactly the headers helmet sets (%s), in the same order', async (_name, opts) => {
    const direct = await request(appWith(helmet(opts))).get('/x').expect(200);
    const frozen = await request(appWith(fixedHeaders(helmet(opts)))).get('/x').expect(200);
    expect(Object.keys(frozen.headers).filter((k) => k !== 'date')).toEqual(Object.keys(direct.headers).filter((k) => k !== 'date'));
    expect(without(frozen.headers, 'date')).toEqual(without(direct.headers, 'date'));
    // Helmet removes X-Powered-By; so does the frozen copy.
    expect(frozen.headers['x-powered-by']).toBeUndefined();
  });

  it('refuses, at start-up, a middleware that does not finish synchronously, fails, or sets different headers each time', () => {
    expect(() => fixedHeaders((_req, _res, next) => void setTimeout(next, 0))).toThrow(/synchronously/);
    expect(() => fixedHeaders((_req, _res, next) => next(new Error('bad option')))).toThrow(/bad option/);
    // A value made afresh per answer (a CSP nonce) must not be frozen.
    const nonce = helmet({ contentSecurityPolicy: { directives: { 'script-src': ["'self'", () => `'nonce-${Math.random().toString(36).slice(2)}'`] } } });
    expect(() => fixedHeaders(nonce)).toThrow(/different headers/);
  });
});
