import { createHash } from 'node:crypto';
import type { Server as HttpServer, IncomingMessage, ServerResponse } from 'node:http';
import { Server, type Socket } from 'socket.io';
import type { RequestHandler } from 'express';
import type passport from 'passport';
import type { SessionUser } from '@shared/api/auth';
import { HELLO_EVENT, SESSION_ENDED_EVENT } from '@shared/api/realtime';
import { can, type Role } from '@shared/auth/roles';
import { logger } from '../lib/logger';

type EngineRequest = IncomingMessage & { _query?: Record<string, string>; user?: SessionUser; sessionID?: string };

export type SessionEndReason = 'signed_out' | 'deactivated' | 'expired';

/** Room names: one per session, per person, per role and per team. */
export const rooms = {
  // A digest of the session id: room names travel between web servers, session ids stay in cookies and the session table.
  session: (sid: string) => `session:${createHash('sha256').update(sid).digest('hex').slice(0, 32)}`,
  user: (id: number) => `user:${id}`,
  role: (role: string) => `role:${role}`,
  team: (id: number) => `team:${id}`,
};

/** The teams of each of these people (investigator group memberships). */
export type LoadTeams = (userIds: number[]) => Promise<Map<number, number[]>>;

/** Tells every web server that the sockets of a session or person room must end (the event bus). */
export type AnnounceEnded = (room: string, reason: SessionEndReason) => Promise<void>;

/** Team rooms matter to those who see cases by team: queue workers without every team's cases. */
const joinsTeamRooms = (role: Role) => can(role, 'queue:read') && !can(role, 'case:any-team');

/**
 * Socket.IO for staff consoles. The handshake runs the same express-session
 * and passport middleware as the API, so only a signed-in session gets a
 * socket, and each socket sits in its session's, person's and role's rooms.
 */
export class SocketHub {
  readonly io: Server;

  constructor(
    http: HttpServer,
    sessionMiddleware: RequestHandler,
    pp: passport.PassportStatic,
    private readonly loadTeams: LoadTeams,
    private readonly announceEnded: AnnounceEnded,
  ) {
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
    // Team rooms are looked up before the socket counts as connected, so no case event slips past a new socket.
    this.io.use((socket, next) => {
      const user = (socket.request as EngineRequest).user!;
      if (!joinsTeamRooms(user.role)) return next();
      this.loadTeams([user.id]).then(
        (teams) => {
          socket.data.teams = teams.get(user.id) ?? [];
          next();
        },
        (err: Error) => next(err),
      );
    });
    this.io.on('connection', (socket: Socket) => {
      const req = socket.request as EngineRequest;
      const user = req.user!;
      const teams = ((socket.data.teams as number[] | undefined) ?? []).map(rooms.team);
      void socket.join([rooms.session(req.sessionID ?? 'none'), rooms.user(user.id), rooms.role(user.role), ...teams]);
      socket.emit(HELLO_EVENT, { user: { id: user.id, role: user.role }, serverTime: new Date().toISOString() });
    });
  }

  /** Team memberships changed: puts every socket on this server in the team rooms of its person's current teams. */
  async refreshTeams(): Promise<void> {
    const sockets = [...this.io.of('/').sockets.values()].filter((s) => joinsTeamRooms((s.request as EngineRequest).user!.role));
    if (sockets.length === 0) return;
    const teams = await this.loadTeams([...new Set(sockets.map((s) => (s.request as EngineRequest).user!.id))]);
    for (const socket of sockets) {
      const want = new Set((teams.get((socket.request as EngineRequest).user!.id) ?? []).map(rooms.team));
      for (const room of socket.rooms) if (room.startsWith('team:') && !want.has(room)) void socket.leave(room);
      void socket.join([...want]);
    }
  }

  /** Tells every socket of a session, on every web server, that it has ended, then disconnects them. */
  endSession(sid: string, reason: SessionEndReason): void {
    this.endEverywhere(rooms.session(sid), reason);
  }

  /** Ends every session of a person, on every web server (deactivation, role change). */
  endUser(userId: number, reason: SessionEndReason): void {
    this.endEverywhere(rooms.user(userId), reason);
  }

  private endEverywhere(room: string, reason: SessionEndReason): void {
    // This server at once; the others when the bus brings the announcement (this one hears it too: nothing is left to end).
    this.closeRoom(room, reason);
    this.announceEnded(room, reason).catch((err: Error) => logger().warn({ err: err.message }, 'session end not announced to other web servers'));
  }

  /** Sends `session:ended` to the sockets of a session or person room on this server, then disconnects them. */
  closeRoom(room: string, reason: SessionEndReason): void {
    if (!room.startsWith('session:') && !room.startsWith('user:')) return;
    this.io.to(room).emit(SESSION_ENDED_EVENT, { reason });
    this.io.in(room).disconnectSockets(true);
    logger().debug({ reason }, 'session sockets closed');
  }

  close(): Promise<void> {
    return new Promise((resolve) => {
      void this.io.close(() => resolve());
    });
  }
}
