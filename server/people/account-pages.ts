import { Router } from 'express';
import { z } from 'zod';
import type { AppContext } from '../platform/app-context';
import { contextOf } from '../platform/context';
import { signedIn } from '../platform/permissions';
import { hashPassword, passwordSchema, verifyPassword } from './passwords';
import { parseForm } from '../platform/validation';
import { findUserById, findUserForSignIn, setUserPassword, setUserPreferences } from './service';
import { HttpError } from '../platform/errors';

const passwordForm = z
  .object({ current: z.string().min(1, 'Enter your current password.'), password: passwordSchema, confirm: z.string() })
  .refine((v) => v.password === v.confirm, { message: 'The two passwords differ.', path: ['confirm'] });

const preferencesForm = z.object({
  units: z.enum(['us', 'metric'], { message: 'Choose US customary or metric units.' }),
  language: z.enum(['en', 'es'], { message: 'Choose English or Spanish.' }),
});

/** Every signed-in user: own password, units and language. */
export function accountPages(ctx: AppContext): Router {
  const router = Router();
  router.use('/account', signedIn);

  const show = (res: import('express').Response, status: number, extra: Record<string, unknown> = {}) =>
    res.status(status).render('account/index', { title: 'Your account', passwordErrors: {}, prefErrors: {}, ...extra });

  router.get('/account', (_req, res) => show(res, 200));

  router.post('/account/password', async (req, res) => {
    const user = contextOf(req).user;
    const parsed = parseForm(passwordForm, req.body);
    if (!parsed.ok) return show(res, 400, { passwordErrors: parsed.errors });
    const stored = await findUserForSignIn(ctx.db, user.email);
    if (!(await verifyPassword(parsed.value.current, stored?.passwordHash))) {
      return show(res, 400, { passwordErrors: { current: 'That is not your current password.' } });
    }
    await setUserPassword(ctx.db, user.organisationId, user.id, await hashPassword(parsed.value.password, ctx.config.BCRYPT_ROUNDS));
    // The change ended every session of this user; this one signs in again under the new
    // version (with a fresh session id), the others stay signed out.
    const fresh = await findUserById(ctx.db, user.id);
    if (!fresh) throw new HttpError('not_found');
    await new Promise<void>((resolve, reject) => req.logIn(fresh, (err) => (err ? reject(err) : resolve())));
    req.session.flash = { kind: 'info', text: 'Your password is changed. Every other session of yours is signed out.' };
    res.redirect('/account');
  });

  router.post('/account/preferences', async (req, res) => {
    const user = contextOf(req).user;
    const parsed = parseForm(preferencesForm, req.body);
    if (!parsed.ok) return show(res, 400, { prefErrors: parsed.errors });
    await setUserPreferences(ctx.db, user.organisationId, user.id, parsed.value);
    req.session.flash = { kind: 'info', text: 'Your preferences are saved.' };
    res.redirect('/account');
  });

  return router;
}
