import type { Request } from 'express';
import type { Database } from '../db/database';
import { appendAudit, type AuditEntry } from './audit-repository';

/** Who did it and from where, taken from the request (signed-in user, API key or nobody). */
export function actorFromRequest(req: Request): Pick<AuditEntry, 'actorType' | 'actorId' | 'actorLabel' | 'ip' | 'userAgent'> {
  const user = req.user;
  const apiKey = req.apiKey;
  return {
    actorType: user ? 'user' : apiKey ? 'api_key' : 'anonymous',
    actorId: user ? user.id : apiKey ? apiKey.id : null,
    actorLabel: user ? user.email : apiKey ? apiKey.name : null,
    ip: req.ip ?? null,
    userAgent: req.get('user-agent') ?? null,
  };
}

/** Records an action taken through an HTTP request. */
export function auditRequest(
  db: Database,
  req: Request,
  entry: Omit<AuditEntry, 'actorType' | 'actorId' | 'actorLabel' | 'ip' | 'userAgent'> & Partial<AuditEntry>,
) {
  return appendAudit(db, { ...actorFromRequest(req), ...entry });
}
