import session from 'express-session';
import connectSessionSequelize from 'connect-session-sequelize';
import type { RequestHandler } from 'express';
import type { Config } from '../config/index';
import type { Database } from '../db/database';

export const SESSION_COOKIE = 'edgecase.sid';

interface PassportSessionData {
  passport?: { user?: number };
}

export interface SessionSetup {
  middleware: RequestHandler;
  store: session.Store & { stopExpiringSessions(): void };
}

/**
 * express-session with its rows in MariaDB. The cookie is httpOnly and
 * SameSite=Lax (Secure behind TLS); `rolling` renews it on every request, so
 * its max age is an idle timeout: a session unused for that long is gone.
 */
export function createSession(c: Config, db: Database): SessionSetup {
  const SequelizeStore = connectSessionSequelize(session.Store);
  /**
   * The library only sweeps expired rows every few minutes and returns them
   * until then; an idle timeout has to hold on every request, so `get` checks
   * the row's expiry itself.
   */
  class ExpiringStore extends SequelizeStore {
    override get(sid: string, fn: (err: unknown, sess?: session.SessionData | null) => void) {
      db.models.Session.findByPk(sid)
        .then(async (row) => {
          if (!row || !row.data) return fn(null, null);
          if (row.expires && row.expires.getTime() <= Date.now()) {
            await row.destroy();
            return fn(null, null);
          }
          fn(null, JSON.parse(row.data) as session.SessionData);
        })
        .catch((err) => fn(err));
    }
  }
  const idleMs = c.SESSION_IDLE_MINUTES * 60_000;
  const store = new ExpiringStore({
    db: db.sequelize,
    table: 'Session',
    expiration: idleMs,
    checkExpirationInterval: 5 * 60_000,
    extendDefaultFields: (defaults: { data: string; expires: Date }, sess: PassportSessionData) => ({
      data: defaults.data,
      expires: defaults.expires,
      userId: sess.passport?.user ?? null,
    }),
  });
  const middleware = session({
    name: SESSION_COOKIE,
    secret: c.SESSION_SECRET,
    store,
    resave: false,
    saveUninitialized: false,
    rolling: true,
    proxy: c.TRUST_PROXY > 0,
    cookie: {
      httpOnly: true,
      sameSite: 'lax',
      secure: c.COOKIE_SECURE,
      maxAge: idleMs,
      path: '/',
    },
  });
  return { middleware, store: store as unknown as SessionSetup['store'] };
}
