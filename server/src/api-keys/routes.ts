import { z } from 'zod';
import { needs, type RouteSpec } from '../access/route-table';
import { AppError } from '../lib/app-error';
import { parseOrThrow } from '../lib/validate';
import { auditRequest } from '../audit/record-audit';
import type { Database } from '../db/database';
import { apiKeyCreateSchema, type AdminApiKey } from '@shared/api/admin';
import { createApiKey, listApiKeys, revokeApiKey, type ApiKeyRecord } from './api-key-repository';

const idParam = z.coerce.number().int().positive();
const iso = (d: Date | null) => (d ? new Date(d).toISOString() : null);
const toApi = (k: ApiKeyRecord): AdminApiKey => ({
  id: k.id,
  name: k.name,
  keyPrefix: k.keyPrefix,
  scopes: k.scopes,
  createdAt: iso(k.createdAt)!,
  lastUsedAt: iso(k.lastUsedAt),
  revokedAt: iso(k.revokedAt),
});

export function apiKeyRoutes(d: {
  db: Database;
  /** Drops this server's cached keys and tells the other web servers to drop theirs. */
  keysChanged: () => Promise<void>;
}): RouteSpec[] {
  return [
    {
      method: 'get',
      path: '/admin/api-keys',
      access: needs('apikeys:manage'),
      summary: 'API keys of upstream systems (prefix, scopes, last use; never the key)',
      handler: async (_req, res) => {
        res.set('Cache-Control', 'no-store');
        res.json({ apiKeys: (await listApiKeys(d.db)).map(toApi) });
      },
    },
    {
      method: 'post',
      path: '/admin/api-keys',
      access: needs('apikeys:manage'),
      summary: 'Create an API key; the key is in this answer and nowhere else, ever',
      handler: async (req, res) => {
        const body = parseOrThrow(apiKeyCreateSchema, req.body);
        const { key, record } = await createApiKey(d.db, { name: body.name, scopes: body.scopes, createdBy: req.user!.id });
        await auditRequest(d.db, req, { action: 'apikey.create', targetType: 'api_key', targetId: record.id, outcome: 'success', details: { name: record.name, scopes: record.scopes, keyPrefix: record.keyPrefix } });
        res.set('Cache-Control', 'no-store');
        res.status(201).json({ key, apiKey: toApi(record) });
      },
    },
    {
      method: 'post',
      path: '/admin/api-keys/:id/revoke',
      access: needs('apikeys:manage'),
      summary: 'Revoke an API key (every web server refuses it from the next request on)',
      handler: async (req, res) => {
        const id = parseOrThrow(idParam, req.params.id, 'API key id');
        if (!(await revokeApiKey(d.db, id))) {
          const exists = (await listApiKeys(d.db)).some((k) => k.id === id);
          throw exists ? AppError.conflict('This key is revoked already.', 'already_revoked') : AppError.notFound('No such API key.');
        }
        await d.keysChanged();
        await auditRequest(d.db, req, { action: 'apikey.revoke', targetType: 'api_key', targetId: id, outcome: 'success' });
        res.json({ apiKeys: (await listApiKeys(d.db)).map(toApi) });
      },
    },
  ];
}
