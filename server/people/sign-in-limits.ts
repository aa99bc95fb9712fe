import { rateLimit, ipKeyGenerator } from 'express-rate-limit';
import type { RequestHandler } from 'express';
import { HttpError } from '../platform/errors';
import { normaliseEmail } from './db';

const WINDOW_MS = 15 * 60 * 1000;

/**
 * Failed sign-ins are limited per account (guessing one password) and per address (trying many
 * accounts). Only failures count (status ≥ 400), so people who sign in often are never slowed.
 * Counters live in memory: a deployment with several app servers should give each the same store.
 */
export function signInLimits(perAccount: number, perAddress: number): RequestHandler[] {
  const onLimit: RequestHandler = () => {
    throw new HttpError('rate_limited', 'Too many failed sign-ins. Wait 15 minutes, or ask an administrator to reset your password.');
  };
  const common = {
    windowMs: WINDOW_MS,
    skipSuccessfulRequests: true,
    standardHeaders: 'draft-8' as const,
    legacyHeaders: false,
    handler: (req: Parameters<RequestHandler>[0], res: Parameters<RequestHandler>[1], next: Parameters<RequestHandler>[2]) => {
      try {
        onLimit(req, res, next);
      } catch (err) {
        next(err);
      }
    },
  };
  const byAddress = rateLimit({
    ...common,
    limit: perAddress,
    keyGenerator: (req) => `addr:${ipKeyGenerator(req.ip ?? 'unknown')}`,
  });
  const byAccount = rateLimit({
    ...common,
    limit: perAccount,
    keyGenerator: (req) => {
      const email = typeof req.body?.email === 'string' ? normaliseEmail(req.body.email) : '';
      return `acct:${email}`;
    },
  });
  return [byAddress, byAccount];
}
