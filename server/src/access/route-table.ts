import type { Request, RequestHandler, Response, NextFunction, Router } from 'express';
import { can, type Capability } from '@shared/auth/roles';
import { AppError } from '../lib/app-error';

/**
 * Who may call a route. Every route is declared with one of these, so the
 * access tests can be generated from the table and a new route cannot be
 * added without saying who may use it.
 */
export type Access =
  | { kind: 'public' }
  | { kind: 'session' }
  | { kind: 'capability'; capability: Capability }
  | { kind: 'apiKey'; scope: string };

export type HttpMethod = 'get' | 'post' | 'put' | 'patch' | 'delete';

export interface RouteSpec {
  method: HttpMethod;
  /** Express path below /api, e.g. `/auth/login` or `/cases/:id`. */
  path: string;
  access: Access;
  summary: string;
  /** Skip the CSRF check (only for public reads or routes authenticated by an API key). */
  csrf?: boolean;
  handler: RequestHandler | RequestHandler[];
}

export const PUBLIC: Access = { kind: 'public' };
export const SIGNED_IN: Access = { kind: 'session' };
export const needs = (capability: Capability): Access => ({ kind: 'capability', capability });

export function isStateChanging(method: HttpMethod): boolean {
  return method !== 'get';
}

/** Middleware enforcing a route's access rule for staff sessions. */
export function accessGuard(access: Access): RequestHandler {
  return (req: Request, _res: Response, next: NextFunction) => {
    if (access.kind === 'public' || access.kind === 'apiKey') return next();
    if (!req.user) return next(AppError.unauthorized());
    if (access.kind === 'capability' && !can(req.user.role, access.capability)) {
      return next(AppError.forbidden());
    }
    next();
  };
}

/**
 * Registers routes on a router with their access guard and CSRF check in front,
 * and returns the table of what was registered (used by the access tests).
 */
export function mountRoutes(
  router: Router,
  specs: RouteSpec[],
  guards: { csrf: RequestHandler; apiKey: (scope: string) => RequestHandler },
): RouteSpec[] {
  const csrfProtection = guards.csrf;
  for (const spec of specs) {
    const chain: RequestHandler[] = [spec.access.kind === 'apiKey' ? guards.apiKey(spec.access.scope) : accessGuard(spec.access)];
    const wantsCsrf = spec.csrf ?? (isStateChanging(spec.method) && spec.access.kind !== 'apiKey');
    if (wantsCsrf) chain.push(csrfProtection);
    const handlers = Array.isArray(spec.handler) ? spec.handler : [spec.handler];
    router[spec.method](spec.path, ...chain, ...handlers);
  }
  return specs;
}

/** Wraps an async handler so a rejected promise reaches the error handler (Express 5 does this too; kept explicit for arrays). */
export function handle(fn: (req: Request, res: Response, next: NextFunction) => Promise<unknown> | unknown): RequestHandler {
  return (req, res, next) => {
    Promise.resolve(fn(req, res, next)).catch(next);
  };
}
