import passport from 'passport';
import { Strategy as LocalStrategy } from 'passport-local';
import type { Knex } from 'knex';
import { findUserById, findUserForSignIn, toUser, type UserRow } from './db';
import type { FastReads } from '../platform/fast-reads';
import { makeStandInHash, verifyPassword } from './passwords';

/** One message for an unknown address and a wrong password, so neither can be probed. */
export const SIGN_IN_FAILED = 'That e-mail and password do not match an active account.';

/** What a session stores of its user (a plain id in sessions made before session versions). */
type SessionUser = { id: string; v: number };

export function configurePassport(db: Knex, bcryptRounds: number, fast?: FastReads): passport.PassportStatic {
  const standIn = makeStandInHash(bcryptRounds);
  const pp = new passport.Passport() as unknown as passport.PassportStatic;
  pp.use(
    new LocalStrategy({ usernameField: 'email', passwordField: 'password' }, async (email, password, done) => {
      try {
        const user = await findUserForSignIn(db, String(email));
        const ok = await verifyPassword(String(password), user?.passwordHash, standIn);
        if (!user || !ok || !user.active) return done(null, false, { message: SIGN_IN_FAILED });
        const { passwordHash: _omit, ...safe } = user;
        return done(null, safe);
      } catch (err) {
        return done(err);
      }
    }),
  );
  // The session keeps the user's id and the session version it was signed in under.
  pp.serializeUser((user, done) => done(null, { id: (user as Express.User).id, v: (user as Express.User).sessionVersion }));
  // Loaded on every request so that a deactivation or a role change takes effect at once; a
  // session signed in before the last password change, reset or deactivation is refused.
  pp.deserializeUser(async (stored: SessionUser | string, done) => {
    try {
      const { id, v } = typeof stored === 'string' ? { id: stored, v: 0 } : stored;
      const row = fast?.userRow(id);
      const user = fast ? (row ? toUser(row as unknown as UserRow) : undefined) : await findUserById(db, id);
      done(null, user && user.active && user.sessionVersion === v ? user : false);
    } catch (err) {
      done(err);
    }
  });
  return pp;
}
