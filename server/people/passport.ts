import passport from 'passport';
import { Strategy as LocalStrategy } from 'passport-local';
import type { Knex } from 'knex';
import type { RequestHandler } from 'express';
import { findUserById, findUserForSignIn, toUser, type User, type UserRow } from './db';
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
  const load = userOfSession(db, fast);
  pp.deserializeUser((stored: SessionUser | string, done) => {
    settle(load, stored, (err, user) => done(err, user));
  });
  return pp;
}

/**
 * The user a session was signed in as, loaded on every request so that a deactivation or a role
 * change takes effect at once; false for a session signed in before the user's last password
 * change, reset or deactivation. Without a promise when the prepared-statement reads serve it.
 */
function userOfSession(db: Knex, fast?: FastReads) {
  const valid = (user: User | undefined, v: number) => (user && user.active && user.sessionVersion === v ? user : false);
  return (stored: SessionUser | string): Express.User | false | Promise<Express.User | false> => {
    const { id, v } = typeof stored === 'string' ? { id: stored, v: 0 } : stored;
    if (!fast) return findUserById(db, id).then((user) => valid(user, v));
    const row = fast.userRow(id);
    return valid(row ? toUser(row as unknown as UserRow) : undefined, v);
  };
}

function settle(
  load: ReturnType<typeof userOfSession>,
  stored: SessionUser | string,
  done: (err: unknown, user?: Express.User | false) => void,
) {
  let result;
  try {
    result = load(stored);
  } catch (err) {
    return done(err);
  }
  if (result instanceof Promise) result.then((user) => done(null, user), done);
  else done(null, result);
}

/**
 * What passport.session() does on each request, without its per-request strategy objects: the
 * session's user is loaded into req.user, and a session whose user is no longer valid forgets
 * them (the session then reads as signed out, and is saved so).
 */
export function sessionUser(db: Knex, fast?: FastReads): RequestHandler {
  const load = userOfSession(db, fast);
  return (req, _res, next) => {
    const stored = (req.session as { passport?: { user?: SessionUser | string } } | undefined)?.passport?.user;
    if (stored === undefined || stored === null || stored === '') return next();
    settle(load, stored, (err, user) => {
      if (err) return next(err);
      if (user) req.user = user;
      else delete (req.session as unknown as { passport: { user?: unknown } }).passport.user;
      next();
    });
  };
}
