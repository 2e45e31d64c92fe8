import type { Server as HttpServer, IncomingMessage, ServerResponse } from 'node:http';
import { Server, type Socket } from 'socket.io';
import type { RequestHandler } from 'express';
import type passport from 'passport';
import type { SessionUser } from '@shared/api/auth';
import { logger } from '../lib/logger';

type EngineRequest = IncomingMessage & { _query?: Record<string, string>; user?: SessionUser; sessionID?: string };

export type SessionEndReason = 'signed_out' | 'deactivated' | 'expired';

/** Room names: one per session, per person and per role. */
export const rooms = {
  session: (sid: string) => `session:${sid}`,
  user: (id: number) => `user:${id}`,
  role: (role: string) => `role:${role}`,
};

/**
 * Socket.IO for staff consoles. The handshake runs the same express-session
 * and passport middleware as the API, so only a signed-in session gets a
 * socket, and each socket sits in its session's, person's and role's rooms.
 */
export class SocketHub {
  readonly io: Server;

  constructor(http: HttpServer, sessionMiddleware: RequestHandler, pp: passport.PassportStatic) {
    this.io = new Server(http, { serveClient: false, cors: { origin: false } });
    const onlyForHandshake =
      (mw: RequestHandler) => (req: EngineRequest, res: ServerResponse, next: (err?: unknown) => void) => {
        if (req._query?.sid === undefined) mw(req as never, res as never, next);
        else next();
      };
    this.io.engine.use(onlyForHandshake(sessionMiddleware));
    this.io.engine.use(onlyForHandshake(pp.session() as RequestHandler));
    this.io.engine.use(
      onlyForHandshake((req, res, next) => {
        if ((req as EngineRequest).user) return next();
        res.writeHead(401, { 'Content-Type': 'application/json' });
        res.end(JSON.stringify({ error: { code: 'unauthenticated', message: 'Sign in to continue.' } }));
      }),
    );
    this.io.on('connection', (socket: Socket) => {
      const req = socket.request as EngineRequest;
      const user = req.user!;
      void socket.join([rooms.session(req.sessionID ?? 'none'), rooms.user(user.id), rooms.role(user.role)]);
      socket.emit('hello', { user: { id: user.id, role: user.role }, serverTime: new Date().toISOString() });
    });
  }

  /** Tells every socket of a session that it has ended, then disconnects them. */
  endSession(sid: string, reason: SessionEndReason): void {
    const room = rooms.session(sid);
    this.io.to(room).emit('session:ended', { reason });
    this.io.in(room).disconnectSockets(true);
    logger().debug({ reason }, 'session sockets closed');
  }

  /** Ends every session of a person (deactivation, role change). */
  endUser(userId: number, reason: SessionEndReason): void {
    const room = rooms.user(userId);
    this.io.to(room).emit('session:ended', { reason });
    this.io.in(room).disconnectSockets(true);
  }

  close(): Promise<void> {
    return new Promise((resolve) => {
      void this.io.close(() => resolve());
    });
  }
}
