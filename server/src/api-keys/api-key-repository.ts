import { createHash, randomBytes } from 'node:crypto';
import { QueryTypes } from 'sequelize';
import type { Database } from '../db/database';

/** Scopes an upstream system's key can hold. */
export const API_KEY_SCOPES = ['transactions:write', 'transactions:read', 'decisions:write'] as const;
export type ApiKeyScope = (typeof API_KEY_SCOPES)[number];

export interface ApiKeyRecord {
  id: number;
  name: string;
  keyPrefix: string;
  scopes: string[];
  createdAt: Date;
  lastUsedAt: Date | null;
  revokedAt: Date | null;
}

export const hashApiKey = (key: string) => createHash('sha256').update(key, 'utf8').digest('hex');

/** Creates a key and returns its plain text once; only its hash is stored. */
export async function createApiKey(db: Database, input: { name: string; scopes: string[]; createdBy?: number | null; plainKey?: string }): Promise<{ key: string; record: ApiKeyRecord }> {
  const key = input.plainKey ?? `ek_${randomBytes(32).toString('base64url')}`;
  const now = new Date();
  const [id] = (await db.sequelize.query(
    'INSERT INTO api_keys (name, key_prefix, key_hash, scopes, created_by, created_at, updated_at) VALUES (?, ?, ?, ?, ?, ?, ?)',
    { replacements: [input.name, key.slice(0, 8), hashApiKey(key), input.scopes.join(','), input.createdBy ?? null, now, now], type: QueryTypes.INSERT },
  )) as unknown as [number];
  return {
    key,
    record: { id: Number(id), name: input.name, keyPrefix: key.slice(0, 8), scopes: input.scopes, createdAt: now, lastUsedAt: null, revokedAt: null },
  };
}

interface Row {
  id: number;
  name: string;
  key_prefix: string;
  scopes: string;
  created_at: Date;
  last_used_at: Date | null;
  revoked_at: Date | null;
}

const toRecord = (r: Row): ApiKeyRecord => ({
  id: Number(r.id),
  name: r.name,
  keyPrefix: r.key_prefix,
  scopes: r.scopes.split(',').filter(Boolean),
  createdAt: r.created_at,
  lastUsedAt: r.last_used_at,
  revokedAt: r.revoked_at,
});

export async function findApiKeyByHash(db: Database, hash: string): Promise<ApiKeyRecord | null> {
  const rows = await db.sequelize.query<Row>('SELECT id, name, key_prefix, scopes, created_at, last_used_at, revoked_at FROM api_keys WHERE key_hash = ?', {
    replacements: [hash],
    type: QueryTypes.SELECT,
  });
  return rows[0] ? toRecord(rows[0]) : null;
}

export async function listApiKeys(db: Database): Promise<ApiKeyRecord[]> {
  const rows = await db.sequelize.query<Row>('SELECT id, name, key_prefix, scopes, created_at, last_used_at, revoked_at FROM api_keys ORDER BY id', {
    type: QueryTypes.SELECT,
  });
  return rows.map(toRecord);
}

export async function revokeApiKey(db: Database, id: number): Promise<boolean> {
  const [, affected] = (await db.sequelize.query('UPDATE api_keys SET revoked_at = UTC_TIMESTAMP(3), updated_at = UTC_TIMESTAMP(3) WHERE id = ? AND revoked_at IS NULL', {
    replacements: [id],
    type: QueryTypes.UPDATE,
  })) as unknown as [unknown, number];
  return affected > 0;
}

export async function touchApiKey(db: Database, id: number): Promise<void> {
  await db.sequelize.query('UPDATE api_keys SET last_used_at = UTC_TIMESTAMP(3) WHERE id = ?', { replacements: [id], type: QueryTypes.UPDATE });
}
