import { Router, type Request, type Response, type NextFunction } from 'express';
import type passport from 'passport';
import type { AppContext } from '../platform/app-context';
import { contextOf } from '../platform/context';
import { signedIn } from '../platform/permissions';
import { SIGN_IN_FAILED } from './passport';
import { HttpError } from '../platform/errors';
import { validateBody } from '../platform/validation';
import { recordSignIn, setUserPreferences } from './service';
import { signInSchema, preferencesSchema, toSessionUser } from './session-user';

/** POST, GET, DELETE /api/session (README, "API"), plus PATCH for the user's own preferences. */
export function sessionApi(ctx: AppContext, pp: passport.PassportStatic): Router {
  const router = Router();

  router.post('/', validateBody(signInSchema), (req: Request, res: Response, next: NextFunction) => {
    pp.authenticate('local', (err: unknown, user: Express.User | false) => {
      if (err) return next(err);
      if (!user) return next(new HttpError('unauthenticated', SIGN_IN_FAILED));
      // passport 0.7 regenerates the session here: a fresh id and a fresh CSRF secret.
      req.logIn(user, async (loginErr) => {
        if (loginErr) return next(loginErr);
        try {
          await recordSignIn(ctx.db, user.organisationId, user.id);
          res.json({ user: toSessionUser(user), csrfToken: req.csrfToken?.() });
        } catch (e) {
          next(e);
        }
      });
    })(req, res, next);
  });

  router.get('/', (req, res) => {
    if (!req.user) {
      // The token lets a signed-out client make its sign-in request with the header too.
      res.status(401).json({
        error: { code: 'unauthenticated', message: 'Please sign in.' },
        csrfToken: req.csrfToken?.(),
      });
      return;
    }
    res.json({ user: toSessionUser(req.user), csrfToken: req.csrfToken?.() });
  });

  router.patch('/', signedIn, validateBody(preferencesSchema), async (req, res) => {
    const user = contextOf(req).user;
    const prefs = { units: req.body.units ?? user.units, language: req.body.language ?? user.language };
    await setUserPreferences(ctx.db, user.organisationId, user.id, prefs);
    res.json({ user: toSessionUser({ ...user, ...prefs }), csrfToken: req.csrfToken?.() });
  });

  router.delete('/', (req, res, next) => {
    req.logout((err) => {
      if (err) return next(err);
      req.session.destroy(() => {
        res.clearCookie('crowntip.sid');
        res.status(204).end();
      });
    });
  });

  return router;
}
