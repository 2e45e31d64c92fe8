/**
 * What the security tests share: the route table read as a list of checks,
 * signed-in sessions per role, cases from the real pipeline, and a
 * fingerprint of the data to prove a refused request changed nothing.
 *
 * The OWASP ASVS 4.0 (4.0.3) requirement numbers the suite names beside its
 * checks are cited from memory; the RFC and OWASP cheat-sheet names are exact.
 */
import { mkdtemp, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { QueryTypes } from 'sequelize';
import type { Access, RouteSpec } from '../../../server/src/access/route-table';
import { createApiKey } from '../../../server/src/api-keys/api-key-repository';
import { CAPABILITIES, type Role } from '../../../shared/src/auth/roles';
import { createScoringWorker } from '../../../workers/src/scoring.worker';
import { installChampion } from '../helpers/champion';
import { newCase } from '../helpers/supervision-kit';
import { signedInAgent, type Agent, type TestServer } from '../helpers/test-server';

export type Session = { agent: Agent; csrf: string };

/** The project's one error shape: `{ error: { code, message, ... } }` (contributor guide, conventions). */
export function isErrorBody(body: unknown): boolean {
  const e = (body as { error?: { code?: unknown; message?: unknown } } | null)?.error;
  return typeof e?.code === 'string' && e.code.length > 0 && typeof e.message === 'string' && e.message.length > 0;
}

/** The role whose session the route is checked with: the first role holding its capability; null for public routes (an anonymous session). */
export function roleFor(access: Access): Role | null {
  if (access.kind === 'capability') return CAPABILITIES[access.capability][0];
  if (access.kind === 'session') return 'investigator';
  return null;
}

/** The URL of a route with every path parameter set to `value` (an id no row has, unless given). */
export function urlOf(spec: Pick<RouteSpec, 'path'>, value = '987654321'): string {
  return `/api${spec.path.replace(/:[A-Za-z]+/g, value)}`;
}

export const label = (spec: Pick<RouteSpec, 'method' | 'path'>) => `${spec.method.toUpperCase()} ${spec.path}`;

export const isApiKeyRoute = (spec: RouteSpec) => spec.access.kind === 'apiKey';
export const isStateChanging = (spec: RouteSpec) => spec.method !== 'get';

/** Multipart routes read their body themselves (busboy); every other route gets JSON through express.json. */
export const MULTIPART_ROUTES = new Set(['POST /cases/:id/evidence', 'POST /backfill/transactions', 'POST /labels/imports']);

/** One signed-in session per role of the demo staff, made on first use. */
export function sessionsPerRole(ts: TestServer) {
  const made = new Map<Role, Promise<Session>>();
  return (role: Role): Promise<Session> => {
    let s = made.get(role);
    if (!s) {
      s = signedInAgent(ts, role);
      made.set(role, s);
    }
    return s;
  };
}

/**
 * A checksum of every table but the sessions (their expiry rolls forward on
 * every request): equal before and after means no row was added, removed or
 * changed. Tables come from information_schema, not a list.
 */
export async function dataFingerprint(ts: TestServer): Promise<Map<string, string>> {
  const db = ts.server.db.sequelize;
  const tables = await db.query<{ name: string }>(
    "SELECT TABLE_NAME AS name FROM information_schema.TABLES WHERE TABLE_SCHEMA = DATABASE() AND TABLE_TYPE = 'BASE TABLE' AND TABLE_NAME <> 'sessions' ORDER BY TABLE_NAME",
    { type: QueryTypes.SELECT },
  );
  const rows = await db.query<{ Table: string; Checksum: string | number | null }>(`CHECKSUM TABLE ${tables.map((t) => `\`${t.name}\``).join(', ')}`, {
    type: QueryTypes.SELECT,
  });
  return new Map(rows.map((r) => [r.Table.replace(/^[^.]*\./, ''), String(r.Checksum)]));
}

export function changedTables(before: Map<string, string>, after: Map<string, string>): string[] {
  return [...after].filter(([t, sum]) => before.get(t) !== sum).map(([t]) => t);
}

/** The real pipeline in this process: a champion, an API key and a scoring worker, so ingest opens cases. */
export async function casePipeline(ts: TestServer): Promise<{ key: string; newCase: (amount?: string) => Promise<number>; close(): Promise<void> }> {
  await installChampion(ts.server.db);
  const key = (await createApiKey(ts.server.db, { name: `security ${Date.now()}`, scopes: ['transactions:write', 'transactions:read', 'decisions:write'] })).key;
  const scoring = await createScoringWorker(ts.server.config, ts.server.db, 2);
  return { key, newCase: (amount) => newCase(ts, key, amount), close: () => scoring.close() };
}

/** A folder standing in for the built client (the shell's headers come from the server, not the file). */
export async function fakeClientDist(): Promise<string> {
  const dir = await mkdtemp(path.join(tmpdir(), 'edgecase-shell-'));
  await writeFile(path.join(dir, 'index.html'), '<!doctype html><html><head><title>Edgecase</title><script type="module" src="/assets/app.js"></script></head><body><div id="root"></div></body></html>');
  return dir;
}

/** The secrets production mode requires to differ from the demo defaults (invented here, used nowhere else). */
export const PRODUCTION_ENV = {
  EDGECASE_MODE: 'production',
  SESSION_SECRET: 'security-suite-session-secret-0123456789',
  PAN_HMAC_KEY: 'security-suite-pan-hmac-key-0123456789',
  DB_PASSWORD: process.env.DB_PASSWORD ?? 'edgecase',
} as const;

/** Directive name -> sources, from a Content-Security-Policy value (CSP Level 3, section 2.2: ";"-separated, names case-insensitive). */
export function cspDirectives(header: string | undefined): Map<string, string[]> {
  const out = new Map<string, string[]>();
  for (const part of (header ?? '').split(';')) {
    const [name, ...sources] = part.trim().split(/\s+/);
    if (name && !out.has(name.toLowerCase())) out.set(name.toLowerCase(), sources);
  }
  return out;
}

/** The sources that govern scripts: script-src, else default-src (CSP Level 3, section 6.8.1 fallback list). */
export function scriptSources(csp: Map<string, string[]>): string[] | undefined {
  return csp.get('script-src') ?? csp.get('default-src');
}
