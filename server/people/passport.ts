import passport from 'passport';
import { Strategy as LocalStrategy } from 'passport-local';
import type { Knex } from 'knex';
import { findUserById, findUserForSignIn, toUser, type UserRow } from './db';
import type { FastReads } from '../platform/fast-reads';
import { verifyPassword } from './passwords';

/** One message for an unknown address and a wrong password, so neither can be probed. */
export const SIGN_IN_FAILED = 'That e-mail and password do not match an active account.';

export function configurePassport(db: Knex, fast?: FastReads): passport.PassportStatic {
  const pp = new passport.Passport() as unknown as passport.PassportStatic;
  pp.use(
    new LocalStrategy({ usernameField: 'email', passwordField: 'password' }, async (email, password, done) => {
      try {
        const user = await findUserForSignIn(db, String(email));
        const ok = await verifyPassword(String(password), user?.passwordHash);
        if (!user || !ok || !user.active) return done(null, false, { message: SIGN_IN_FAILED });
        const { passwordHash: _omit, ...safe } = user;
        return done(null, safe);
      } catch (err) {
        return done(err);
      }
    }),
  );
  pp.serializeUser((user, done) => done(null, (user as Express.User).id));
  // Loaded on every request so that a deactivation or a role change takes effect at once.
  pp.deserializeUser(async (id: string, done) => {
    try {
      const row = fast?.userRow(id);
      const user = fast ? (row ? toUser(row as unknown as UserRow) : undefined) : await findUserById(db, id);
      done(null, user && user.active ? user : false);
    } catch (err) {
      done(err);
    }
  });
  return pp;
}
