import type { RequestHandler } from 'express';
import type { Database } from '../db/database';
import { AppError } from '../lib/app-error';
import { findApiKeyByHash, hashApiKey, touchApiKey, type ApiKeyRecord } from './api-key-repository';

const CACHE_MS = 30_000;

/** The API-key guard for a scope, and `forget()`, which drops every cached key (after a revocation). */
export type ApiKeyAuth = ((scope: string) => RequestHandler) & { forget(): void };

/**
 * Bearer API keys for upstream systems. Looked-up keys are cached briefly so
 * the ingest hot path does not query the key table per request; a revocation
 * clears the cache of every web server at once (the `apikeys.changed` event),
 * and the cache time bounds it if that event is lost. Sessions play no part
 * here: a browser cookie cannot reach ingest, and a key cannot reach staff routes.
 */
export function createApiKeyAuth(db: Database, opts: { refuseKeyHash?: string | null } = {}): ApiKeyAuth {
  const cache = new Map<string, { record: ApiKeyRecord | null; at: number }>();
  const lastTouched = new Map<number, number>();
  // Bumped by forget(): a lookup that started before a revocation is not cached after it.
  let generation = 0;

  const guard = (scope: string): RequestHandler =>
    async (req, _res, next) => {
      try {
        const header = req.get('authorization') ?? '';
        const match = /^Bearer\s+(\S{8,200})$/i.exec(header);
        if (!match) throw new AppError({ status: 401, code: 'api_key_missing', message: 'Send an API key as "Authorization: Bearer <key>".' });
        const hash = hashApiKey(match[1]);
        if (opts.refuseKeyHash && hash === opts.refuseKeyHash) {
          throw new AppError({ status: 401, code: 'api_key_invalid', message: 'The demo API key does not work in production mode.' });
        }
        let hit = cache.get(hash);
        if (!hit || Date.now() - hit.at > CACHE_MS) {
          const started = generation;
          hit = { record: await findApiKeyByHash(db, hash), at: Date.now() };
          if (started === generation) cache.set(hash, hit);
        }
        const key = hit.record;
        if (!key || key.revokedAt) throw new AppError({ status: 401, code: 'api_key_invalid', message: 'Unknown or revoked API key.' });
        if (!key.scopes.includes(scope)) throw new AppError({ status: 403, code: 'api_key_scope', message: `This API key lacks the scope ${scope}.` });
        req.apiKey = { id: key.id, name: key.name, scopes: key.scopes };
        const last = lastTouched.get(key.id) ?? 0;
        if (Date.now() - last > 60_000) {
          lastTouched.set(key.id, Date.now());
          void touchApiKey(db, key.id).catch(() => undefined);
        }
        next();
      } catch (err) {
        next(err);
      }
    };
  return Object.assign(guard, {
    forget() {
      generation += 1;
      cache.clear();
    },
  });
}
