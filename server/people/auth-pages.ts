import { Router } from 'express';
import type passport from 'passport';
import { z } from 'zod';
import type { AppContext } from '../platform/app-context';
import { homeFor } from '../platform/permissions';
import { SIGN_IN_FAILED } from './passport';
import { hashPassword, passwordSchema } from './passwords';
import { parseForm } from '../platform/validation';
import { findUserById, findUserForSignIn, recordSignIn, setUserPassword } from './service';
import { checkUserToken, spendUserToken, type TokenPurpose } from './service';
import { sendPasswordResetLink } from './account-links';
import type { AccessLimits } from './sign-in-limits';

/** Only paths on this site are followed after sign-in, never another host. */
export function safeNext(next: unknown): string | null {
  return typeof next === 'string' && next.startsWith('/') && !next.startsWith('//') && !next.startsWith('/\\') ? next : null;
}

const setPasswordForm = z
  .object({ password: passwordSchema, confirm: z.string() })
  .refine((v) => v.password === v.confirm, { message: 'The two passwords differ.', path: ['confirm'] });

const TOKEN_PROBLEMS = {
  unknown: 'This link is not valid. Ask for a new one.',
  used: 'This link has already been used. Ask for a new one if you need it.',
  expired: 'This link has expired. Ask for a new one.',
};

export function authPages(ctx: AppContext, pp: passport.PassportStatic, limits: AccessLimits): Router {
  const router = Router();

  router.get('/login', (req, res) => {
    if (req.user) return res.redirect(homeFor(req.user.role));
    res.render('auth/login', { title: 'Sign in', email: '', error: null, errors: {}, next: safeNext(req.query.next) });
  });

  router.post('/login', (req, res, next) => {
    const target = safeNext(req.body?.next);
    const email = typeof req.body?.email === 'string' ? req.body.email : '';
    // An empty field is said beside it, not as a failed sign-in (nothing was checked).
    const missing: Record<string, string> = {};
    if (!email.trim()) missing.email = 'Enter the e-mail address you sign in with.';
    if (typeof req.body?.password !== 'string' || req.body.password === '') missing.password = 'Enter your password.';
    if (Object.keys(missing).length) {
      res.status(400).render('auth/login', { title: 'Sign in', email, error: null, errors: missing, next: target });
      return;
    }
    pp.authenticate('local', (err: unknown, user: Express.User | false) => {
      if (err) return next(err);
      if (!user) {
        res.status(401).render('auth/login', { title: 'Sign in', email, error: SIGN_IN_FAILED, errors: {}, next: target });
        return;
      }
      req.logIn(user, async (loginErr) => {
        if (loginErr) return next(loginErr);
        await recordSignIn(ctx.db, user.organisationId, user.id);
        res.redirect(target ?? homeFor(user.role));
      });
    })(req, res, next);
  });

  router.post('/logout', (req, res, next) => {
    req.logout((err) => {
      if (err) return next(err);
      req.session.destroy(() => {
        res.clearCookie('crowntip.sid');
        res.redirect('/login');
      });
    });
  });

  router.get('/password/forgot', (_req, res) => {
    res.render('auth/forgot', { title: 'Forgotten password', email: '', sent: false, errors: {} });
  });

  router.post('/password/forgot', async (req, res) => {
    const parsed = parseForm(z.object({ email: z.string().trim().email('Enter an e-mail address.') }), req.body);
    if (!parsed.ok) {
      res.status(400).render('auth/forgot', { title: 'Forgotten password', email: req.body?.email ?? '', sent: false, errors: parsed.errors });
      return;
    }
    const allowed = await limits.allowResetMail(req, parsed.value.email);
    const user = await findUserForSignIn(ctx.db, parsed.value.email);
    // The same answer, in the same time, whether or not the address has an account or is over
    // its limit: the message is sent after the answer.
    if (allowed && user && user.active) {
      // A moment after the answer has gone out, so that its time does not depend on the sending.
      setTimeout(() => {
        sendPasswordResetLink(ctx, user).catch((err) => ctx.logger.error({ err }, 'reset e-mail not sent'));
      }, 20);
    }
    res.render('auth/forgot', { title: 'Forgotten password', email: parsed.value.email, sent: true, errors: {} });
  });

  const tokenRoutes = (purpose: TokenPurpose, base: string, title: string) => {
    router.get(`${base}/:token`, async (req, res) => {
      const check = await checkUserToken(ctx.db, req.params.token, purpose);
      const who = check.ok ? await findUserById(ctx.db, check.userId) : undefined;
      res.status(check.ok ? 200 : 410).render('auth/set-password', {
        title,
        purpose,
        who,
        problem: check.ok ? null : TOKEN_PROBLEMS[check.reason],
        errors: {},
      });
    });
    router.post(`${base}/:token`, async (req, res) => {
      const token = req.params.token;
      const check = await checkUserToken(ctx.db, token, purpose);
      if (!check.ok) {
        res.status(410).render('auth/set-password', { title, purpose, who: undefined, problem: TOKEN_PROBLEMS[check.reason], errors: {} });
        return;
      }
      const who = await findUserById(ctx.db, check.userId);
      const parsed = parseForm(setPasswordForm, req.body);
      if (!parsed.ok || !who) {
        res.status(400).render('auth/set-password', { title, purpose, who, problem: null, errors: parsed.ok ? {} : parsed.errors });
        return;
      }
      if (!(await spendUserToken(ctx.db, token, purpose))) {
        res.status(410).render('auth/set-password', { title, purpose, who: undefined, problem: TOKEN_PROBLEMS.used, errors: {} });
        return;
      }
      await setUserPassword(ctx.db, who.organisationId, who.id, await hashPassword(parsed.value.password, ctx.config.BCRYPT_ROUNDS));
      req.session.flash = { kind: 'info', text: 'Your password is set. Sign in with it now.' };
      res.redirect('/login');
    });
  };
  tokenRoutes('reset', '/password/reset', 'Choose a new password');
  tokenRoutes('invite', '/invite', 'Welcome to Crowntip');

  return router;
}
