import type { Request, Response, NextFunction } from 'express';
import { Strategy as LocalStrategy } from 'passport-local';
import type passport from 'passport';
import { loginRequestSchema, type SessionUser } from '@shared/api/auth';
import { AppError } from '../lib/app-error';
import { parseOrThrow } from '../lib/validate';
import { PUBLIC, SIGNED_IN, type RouteSpec } from '../access/route-table';
import { auditRequest } from '../audit/record-audit';
import type { Database } from '../db/database';
import type { Config } from '../config/index';
import type { CsrfSync } from 'csrf-sync';
import type { LoginLimiter } from './login-limiter';
import { signIn, type SignInResult } from './sign-in';
import type { SocketHub } from '../realtime/socket-hub';

interface AuthDeps {
  db: Database;
  config: Config;
  passport: passport.PassportStatic;
  csrf: CsrfSync;
  limiter: LoginLimiter;
  hub: () => SocketHub | undefined;
}

type SignInFailure = Exclude<SignInResult, { ok: true }>;

export function authRoutes(d: AuthDeps): RouteSpec[] {
  d.passport.use(
    'local',
    new LocalStrategy({ usernameField: 'email', passwordField: 'password', passReqToCallback: true, session: true }, (req, email, password, done) => {
      signIn(d.db, d.config, email, password, { ip: req.ip ?? null, userAgent: req.get('user-agent') ?? null }, d.limiter)
        .then((r) => (r.ok ? done(null, r.user) : done(null, false, r as never)))
        .catch(done);
    }),
  );

  const authenticate = (req: Request, res: Response, next: NextFunction) =>
    new Promise<SessionUser | SignInFailure>((resolve, reject) => {
      d.passport.authenticate('local', { session: false }, (err: unknown, user: SessionUser | false, info: SignInFailure) => {
        if (err) reject(err);
        else resolve(user || info);
      })(req, res, next);
    });

  const logIn = (req: Request, user: SessionUser) =>
    new Promise<void>((resolve, reject) => req.logIn(user, (err) => (err ? reject(err) : resolve())));

  return [
    {
      method: 'get',
      path: '/auth/csrf',
      access: PUBLIC,
      summary: 'The CSRF synchronizer token of this session',
      handler: (req, res) => {
        res.set('Cache-Control', 'no-store');
        res.json({ csrfToken: d.csrf.generateToken(req) });
      },
    },
    {
      method: 'post',
      path: '/auth/login',
      access: PUBLIC,
      summary: 'Sign in with email and password',
      handler: async (req, res, next) => {
        req.body = parseOrThrow(loginRequestSchema, req.body);
        const ip = req.ip ?? 'unknown';
        const wait = await d.limiter.blockedFor(ip);
        if (wait > 0) {
          await auditRequest(d.db, req, {
            action: 'auth.sign_in',
            actorLabel: typeof req.body?.email === 'string' ? req.body.email : undefined,
            targetType: 'user',
            outcome: 'denied',
            details: { reason: 'rate limited', retryAfterSeconds: wait },
          });
          throw new AppError({
            status: 429,
            code: 'rate_limited',
            message: 'Too many failed sign-ins from this address. Try again later.',
            retryAfterSeconds: wait,
            headers: { 'Retry-After': String(wait) },
          });
        }
        const outcome = await authenticate(req, res, next);
        if ('reason' in outcome) {
          await d.limiter.recordFailure(ip);
          if (outcome.reason === 'account_locked') {
            throw new AppError({
              status: 423,
              code: 'account_locked',
              message: 'This account is locked after repeated failed sign-ins. Try again later or ask an admin to unlock it.',
              retryAfterSeconds: outcome.retryAfterSeconds,
              headers: { 'Retry-After': String(outcome.retryAfterSeconds) },
            });
          }
          throw new AppError({ status: 401, code: 'invalid_credentials', message: 'Email or password is not right.' });
        }
        // passport regenerates the session on logIn: a session id known before sign-in is worthless after it.
        await logIn(req, outcome);
        req.session.signedInAt = Date.now();
        const csrfToken = d.csrf.generateToken(req, true);
        res.json({ user: outcome, csrfToken });
      },
    },
    {
      method: 'get',
      path: '/auth/me',
      access: SIGNED_IN,
      summary: 'The signed-in staff member',
      handler: (req, res) => {
        res.set('Cache-Control', 'no-store');
        res.json({ user: req.user });
      },
    },
    {
      method: 'post',
      path: '/auth/logout',
      access: SIGNED_IN,
      summary: 'Sign out and end this session everywhere',
      handler: async (req, res) => {
        const oldSid = req.sessionID;
        await auditRequest(d.db, req, { action: 'auth.sign_out', targetType: 'user', targetId: req.user?.id, outcome: 'success' });
        await new Promise<void>((resolve, reject) => req.logout((err) => (err ? reject(err) : resolve())));
        await new Promise<void>((resolve) => req.session.destroy(() => resolve()));
        d.hub()?.endSession(oldSid, 'signed_out');
        res.clearCookie('edgecase.sid', { path: '/' });
        res.status(204).end();
      },
    },
  ];
}
