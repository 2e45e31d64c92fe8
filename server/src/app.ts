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
import { logger } from './lib/logger';
import { errorHandler, notFoundHandler } from './lib/error-handler';
import { mountRoutes, type RouteSpec } from './access/route-table';
import { createSession } from './auth/session';
import { configurePassport } from './auth/passport';
import { LoginLimiter } from './auth/login-limiter';
import { authRoutes } from './auth/routes';
import { healthRoutes } from './health/routes';
import { demoRoutes } from './demo/routes';
import { SocketHub } from './realtime/socket-hub';

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
  app.set('trust proxy', config.TRUST_PROXY);
  app.use(
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
  );
  app.use(
    pinoHttp({
      logger: logger(),
      autoLogging: { ignore: (req) => req.url === '/api/health' },
      customLogLevel: (_req, res, err) => (err || res.statusCode >= 500 ? 'error' : res.statusCode >= 400 ? 'info' : 'debug'),
      serializers: {
        req: (req: { method: string; url: string }) => ({ method: req.method, url: req.url.split('?')[0] }),
        res: (res: { statusCode: number }) => ({ statusCode: res.statusCode }),
      },
    }),
  );

  const { middleware: sessionMiddleware, store } = createSession(config, db);
  const pp = configurePassport(db);
  const csrf = csrfSync({
    getTokenFromRequest: (req) => req.get(CSRF_HEADER) ?? undefined,
    size: 32,
    errorConfig: { statusCode: 403, code: 'EBADCSRFTOKEN', message: 'invalid csrf token' },
  });
  const limiter = new LoginLimiter(redis, config);
  const http = createServer(app);
  const hub = new SocketHub(http, sessionMiddleware, pp);

  const api = Router();
  api.use(express.json({ limit: '2mb' }));
  api.use(sessionMiddleware);
  api.use(pp.session());

  const routes = mountRoutes(
    api,
    [
      ...healthRoutes({ db, redis }),
      ...authRoutes({ db, config, passport: pp, csrf, limiter, hub: () => hub }),
      ...demoRoutes(config),
    ],
    csrf.csrfSynchronisedProtection,
  );
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
      await hub.close();
      await new Promise<void>((resolve) => (http.listening ? http.close(() => resolve()) : resolve()));
      redis.disconnect();
      await db.close();
    },
  };
}
