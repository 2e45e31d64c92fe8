import { createServer, type Server as HttpServer } from 'node:http';
import { existsSync } from 'node:fs';
import path from 'node:path';
import express, { Router, type Express } from 'express';
import helmet from 'helmet';
import { pinoHttp } from 'pino-http';
import { csrfSync } from 'csrf-sync';
import type { Redis } from 'ioredis';
import { CSRF_HEADER } from '@shared/api/auth';
import { loadConfig, type Config } from './config/index';
import { openDatabase, type Database } from './db/database';
import { createRedis } from './lib/redis';
import { logger, scrubDigits } from './lib/logger';
import { maskCardNumbersInBody } from './lib/mask-card-numbers';
import { logUpstreamRefusals } from './lib/upstream-log';
import { fixedHeaders } from './lib/fixed-headers';
import { errorHandler, notFoundHandler } from './lib/error-handler';
import { mountRoutes, type RouteSpec } from './access/route-table';
import { createSession } from './auth/session';
import { configurePassport } from './auth/passport';
import { LoginLimiter } from './auth/login-limiter';
import { authRoutes } from './auth/routes';
import { healthRoutes } from './health/routes';
import { demoRoutes } from './demo/routes';
import { backfillRoutes } from './backfill/routes';
import { SocketHub } from './realtime/socket-hub';
import { createApiKeyAuth } from './api-keys/api-key-auth';
import { hashApiKey } from './api-keys/api-key-repository';
import { ingestRoutes } from './ingest/routes';
import { ScoringQueue } from './ingest/ingest-queue';
import { VelocityStore } from './scoring/velocity';
import { ActiveModels } from './scoring/active-models';
import { publishEvents, subscribeEvents } from './events/event-bus';
import { bridgeEventsToSockets } from './realtime/event-bridge';
import { DEMO_API_KEY } from './demo/demo-accounts';
import { caseRoutes } from './cases/routes';
import { teamsOf } from './cases/case-access';
import { MailQueue } from './mail/mail-queue';
import { OutgoingEvents } from './outgoing/outgoing-events';
import { boardRoutes } from './board/routes';
import { settingsRoutes } from './settings/routes';
import { routingRoutes } from './routing/routes';
import { approvalRoutes } from './approvals/routes';
import { userRoutes } from './users/routes';
import { apiKeyRoutes } from './api-keys/routes';
import { auditRoutes } from './audit/routes';
import { trainingRoutes } from './training/routes';
import { TrainingQueue } from './training/training-queue';
import { modelRegistryRoutes } from './model-registry/routes';
import { driftRoutes } from './drift/routes';
import { DriftQueue } from './drift/drift-queue';
import { labelRoutes } from './labels/routes';

export interface EdgecaseServer {
  config: Config;
  app: Express;
  http: HttpServer;
  hub: SocketHub;
  db: Database;
  redis: Redis;
  /** Every API route with its access rule, as mounted (the access tests walk this). */
  routes: RouteSpec[];
  listen(port?: number, host?: string): Promise<number>;
  close(): Promise<void>;
}

/**
 * Builds the whole web server: API, built client, Socket.IO. The entry point
 * (`index.ts`) and the integration tests both call this, so tests exercise
 * exactly what ships.
 */
export function createEdgecaseServer(overrides: Partial<NodeJS.ProcessEnv> = {}): EdgecaseServer {
  const config = loadConfig({ ...process.env, ...overrides });
  const db = openDatabase(config);
  const redis = createRedis(config, { name: 'web' });
  redis.on('error', (err) => logger().warn({ err: err.message }, 'redis connection problem'));

  const app = express();
  app.disable('x-powered-by');
  // API answers are no-store, so no client ever revalidates one; an ETag would only hash every body.
  // (Static files are served with their own validators.)
  app.set('etag', false);
  app.set('trust proxy', config.TRUST_PROXY);
  // Helmet's headers are the same on every answer: computed once at start-up (see fixedHeaders).
  app.use(
    fixedHeaders(
      helmet({
        contentSecurityPolicy: {
          directives: {
            'default-src': ["'self'"],
            'connect-src': ["'self'"],
            'img-src': ["'self'", 'data:', 'blob:'],
            'font-src': ["'self'", 'data:'],
            'style-src': ["'self'", "'unsafe-inline'"],
            'object-src': ["'none'"],
            'frame-ancestors': ["'none'"],
            'upgrade-insecure-requests': config.COOKIE_SECURE ? [] : null,
          },
        },
        crossOriginEmbedderPolicy: false,
      }),
    ),
  );
  const accessLog = pinoHttp({
    logger: logger(),
    autoLogging: { ignore: (req) => req.url === '/api/health' },
    customLogLevel: (_req, res, err) => (err || res.statusCode >= 500 ? 'error' : res.statusCode >= 400 ? 'info' : 'debug'),
    serializers: {
      // The query string is dropped; the path can still carry what a caller put in it (a card number for an id).
      req: (req: { method: string; url: string }) => ({ method: req.method, url: scrubDigits(req.url.split('?')[0]) }),
      // The standard serializer reads null when the headers were not out yet as the line was written (seen on 4xx
      // answers); the status the app set is on the raw response, and `sent: false` says so.
      res: (res: { statusCode: number | null; raw?: { statusCode: number } }) =>
        res.statusCode === null ? { statusCode: res.raw?.statusCode ?? null, sent: false } : { statusCode: res.statusCode },
    },
  });
  // Upstream systems call /api/v1 thousands of times a second: pino-http's per-request child logger
  // cost about 6 % of the web server's CPU there, for successes logged at debug that nobody reads.
  // Refusals are still logged.
  app.use((req, res, next) => (req.url.startsWith('/api/v1/') ? logUpstreamRefusals(req, res, next) : accessLog(req, res, next)));

  const { middleware: sessionMiddleware, store } = createSession(config, db);
  const pp = configurePassport(db);
  const csrf = csrfSync({
    getTokenFromRequest: (req) => req.get(CSRF_HEADER) ?? undefined,
    size: 32,
    errorConfig: { statusCode: 403, code: 'EBADCSRFTOKEN', message: 'invalid csrf token' },
  });
  const limiter = new LoginLimiter(redis, config);
  const http = createServer(app);
  // A streamed back-fill import is read as fast as it is stored: give request bodies up to an hour
  // (Node's default cuts them at 300 s); header and idle timeouts stay short.
  http.requestTimeout = 60 * 60_000;
  const hub = new SocketHub(
    http,
    sessionMiddleware,
    pp,
    (userIds) => teamsOf(db, userIds),
    (room, reason) => publishEvents(redis, config.REDIS_PREFIX, [{ type: 'sessions.ended', room, reason, at: new Date().toISOString() }]),
  );

  const scoring = new ScoringQueue(config);
  const mail = new MailQueue(config);
  const outgoing = new OutgoingEvents(db, config);
  const training = new TrainingQueue(config);
  const drift = new DriftQueue(config);
  const velocity = new VelocityStore(redis, config.REDIS_PREFIX);
  const models = new ActiveModels(db).start();
  const subscriber = createRedis(config, { name: 'web-events', forBullmq: true });
  subscriber.on('error', () => undefined);
  const ready = subscribeEvents(subscriber, config.REDIS_PREFIX, (e) => {
    if (e.type === 'model.changed' || e.type === 'settings.changed') models.invalidate();
    if (e.type === 'apikeys.changed') apiKeyAuth.forget();
    bridgeEventsToSockets(hub, e);
  }).catch((err) => logger().warn({ err: (err as Error).message }, 'event subscription failed'));
  const apiKeyAuth = createApiKeyAuth(db, {
    refuseKeyHash: config.EDGECASE_MODE === 'production' ? hashApiKey(DEMO_API_KEY) : null,
  });

  const api = Router();
  // API answers carry authenticated data: no cache may keep them (OWASP ASVS 4.0 V8.2.1). A route may say otherwise for itself.
  api.use((_req, res, next) => {
    res.set('Cache-Control', 'no-store');
    next();
  });
  api.use(express.json({ limit: '2mb' }));
  // Upstream systems authenticate by API key only: no session is read or created on their routes.
  const staff = Router();
  staff.use(maskCardNumbersInBody);
  staff.use(sessionMiddleware);
  staff.use(pp.session());

  const guards = { csrf: csrf.csrfSynchronisedProtection, apiKey: apiKeyAuth };
  const upstream = Router();
  const upstreamRoutes = mountRoutes(upstream, ingestRoutes({ db, redis, config, scoring, velocity, models }), guards);
  const staffRoutes = mountRoutes(
    staff,
    [
      ...healthRoutes({ db, redis }),
      ...authRoutes({ db, config, passport: pp, csrf, limiter, hub: () => hub }),
      ...demoRoutes(config, { redis, db }),
      ...caseRoutes({ db, redis, config, mail, outgoing }),
      ...boardRoutes({ db, redis, config, mail }),
      ...settingsRoutes({ db, redis, config }),
      ...routingRoutes({ db, redis, config }),
      ...approvalRoutes({ db, redis, config, mail, outgoing }),
      ...userRoutes({ db, config, mail, hub }),
      ...apiKeyRoutes({
        db,
        keysChanged: async () => {
          apiKeyAuth.forget();
          // The other web servers drop theirs on the event; if Redis is away, their cache time (30 s) bounds it.
          await publishEvents(redis, config.REDIS_PREFIX, [{ type: 'apikeys.changed', at: new Date().toISOString() }]).catch(() => undefined);
        },
      }),
      ...auditRoutes({ db }),
      ...backfillRoutes({ db, config, velocity, hub }),
      ...modelRegistryRoutes({ db, redis, config }),
      ...trainingRoutes({ db, redis, config, queue: training }),
      ...driftRoutes({ db, queue: drift }),
      ...labelRoutes({ db, config }),
    ],
    guards,
  );
  const routes = [...upstreamRoutes, ...staffRoutes];
  api.use(upstream);
  api.use(staff);
  api.use(notFoundHandler);
  api.use(errorHandler);
  app.use('/api', api);

  // The built client, with the single-page fallback for its routes.
  if (existsSync(config.CLIENT_DIST)) {
    app.use(express.static(config.CLIENT_DIST, { index: false, maxAge: '1h' }));
    app.get('/{*splat}', (_req, res) => {
      res.set('Cache-Control', 'no-cache');
      res.sendFile(path.join(config.CLIENT_DIST, 'index.html'));
    });
  }
  app.use(errorHandler);

  let closed = false;
  return {
    config,
    app,
    http,
    hub,
    db,
    redis,
    routes,
    listen(port = config.PORT, host = config.HOST) {
      return new Promise((resolve, reject) => {
        http.once('error', reject);
        http.listen(port, host, () => {
          const addr = http.address();
          resolve(typeof addr === 'object' && addr ? addr.port : port);
        });
      });
    },
    async close() {
      if (closed) return;
      closed = true;
      store.stopExpiringSessions();
      models.close();
      await ready;
      subscriber.disconnect();
      await scoring.close().catch(() => undefined);
      await mail.close().catch(() => undefined);
      await outgoing.close().catch(() => undefined);
      await training.close().catch(() => undefined);
      await drift.close().catch(() => undefined);
      await hub.close();
      await new Promise<void>((resolve) => (http.listening ? http.close(() => resolve()) : resolve()));
      redis.disconnect();
      await db.close();
    },
  };
}
