import type { RequestHandler } from 'express';
import { HttpError } from './errors';
import type { Role } from './roles';

/** Signed in with an active account; 401 for the API, a trip to the sign-in page for pages. */
export const requireSignIn: RequestHandler = (req, _res, next) => {
  if (!req.user) throw new HttpError('unauthenticated');
  next();
};

/** Signed in and holding one of the roles; checked on the server for every guarded route. */
export function requireRole(...roles: Role[]): RequestHandler {
  return (req, _res, next) => {
    if (!req.user) throw new HttpError('unauthenticated');
    if (!roles.includes(req.user.role)) throw new HttpError('forbidden');
    next();
  };
}
