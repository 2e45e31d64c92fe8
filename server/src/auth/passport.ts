import passport from 'passport';
import type { Database } from '../db/database';
import { findUserById, toSessionUser } from './user-repository';

/**
 * The session holds only the user id; every request reloads the person so a
 * deactivated account or a changed role takes effect at once.
 */
export function configurePassport(db: Database): passport.PassportStatic {
  const p = new passport.Passport();
  p.serializeUser((user, done) => done(null, user.id));
  p.deserializeUser((id: number, done) => {
    findUserById(db, Number(id))
      .then((u) => done(null, u && u.status === 'active' ? toSessionUser(u) : false))
      .catch((err) => done(err));
  });
  return p as unknown as passport.PassportStatic;
}
