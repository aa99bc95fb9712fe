import type { Request, RequestHandler } from 'express';
import { HttpError } from './errors';
import { pickLocale } from './format';
import { allows, type Action } from './permissions';
import type { Role } from './roles';

type Units = Express.User['units'];

/**
 * Who is asking, built once per request right after the session is read: the user (or null),
 * their organisation, the units and locale pages are written in, and what their role may do.
 */
export interface RequestContext {
  user: Express.User | null;
  organisationId: string | null;
  units: Units;
  /** The browser's preferred supported locale (Accept-Language), or false; worked out on first use. */
  readonly locale: string | false;
  can(action: Action): boolean;
}

/** The context of a signed-in user: what handlers behind a guard work with. */
export interface UserContext extends RequestContext {
  user: Express.User;
  /** The user's id, name and organisation, as services record who made a change. */
  id: string;
  name: string;
  organisationId: string;
}

/** A signed-in context for a user outside a request (jobs, seeds, tests). */
export function contextFor(user: Pick<Express.User, 'id' | 'name' | 'organisationId' | 'role' | 'units'> & Partial<Express.User>, locale: string | false = false): UserContext {
  return {
    user: user as Express.User,
    id: user.id,
    name: user.name,
    organisationId: user.organisationId,
    units: user.units,
    locale,
    can: (action) => allows(user.role as Role, action),
  };
}

/** Middleware: sets req.context for every request (after passport has loaded the user). */
export const requestContext: RequestHandler = (req, _res, next) => {
  const user = req.user ?? null;
  let locale: string | false | undefined;
  const getLocale = () => (locale ??= pickLocale((langs) => req.acceptsLanguages(langs)));
  req.context = user
    ? Object.defineProperty({ ...contextFor(user), locale: false }, 'locale', { get: getLocale })
    : Object.defineProperty({ user: null, organisationId: null, units: 'us', locale: false, can: () => false } as RequestContext, 'locale', { get: getLocale });
  next();
};

/** The signed-in user's context; a request without one answers 401 (guards normally stop it first). */
export function contextOf(req: Request): UserContext {
  const ctx = req.context;
  if (!ctx?.user) throw new HttpError('unauthenticated');
  return ctx as UserContext;
}
