import type { SessionUser } from '@shared/api/auth';

declare global {
  namespace Express {
    // passport's req.user is the signed-in staff member.
    // eslint-disable-next-line @typescript-eslint/no-empty-object-type
    interface User extends SessionUser {}
    interface Request {
      /** Set by the API-key middleware on upstream-system routes. */
      apiKey?: { id: number; name: string; scopes: string[] };
    }
  }
}

declare module 'express-session' {
  interface SessionData {
    /** When the session was created by a sign-in (ms since epoch). */
    signedInAt?: number;
  }
}

export {};
