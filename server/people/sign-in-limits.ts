import type { Request, RequestHandler, Response } from 'express';
import { HttpError } from '../platform/errors';
import { normaliseEmail } from './db';

/**
 * Where attempt counters live. Each key counts in fixed windows: the first hit opens a window of
 * `windowMs`, later hits add to it until it ends. The memory store serves one app server; a
 * deployment with several gives them one shared store (the same three methods over a table).
 */
export interface AttemptStore {
  /** Adds one to the key's count and returns the new count within its window. */
  hit(key: string, windowMs: number): Promise<number>;
  /** The key's count within its window (0 when none). */
  count(key: string): Promise<number>;
  /** Forgets the key. */
  reset(key: string): Promise<void>;
}

export class MemoryAttemptStore implements AttemptStore {
  private counts = new Map<string, { n: number; until: number }>();
  async hit(key: string, windowMs: number) {
    const now = Date.now();
    const entry = this.counts.get(key);
    if (!entry || entry.until <= now) {
      if (this.counts.size > 100_000) this.sweep(now); // bounded memory
      this.counts.set(key, { n: 1, until: now + windowMs });
      return 1;
    }
    entry.n += 1;
    return entry.n;
  }
  async count(key: string) {
    const entry = this.counts.get(key);
    return entry && entry.until > Date.now() ? entry.n : 0;
  }
  async reset(key: string) {
    this.counts.delete(key);
  }
  private sweep(now: number) {
    for (const [key, entry] of this.counts) if (entry.until <= now) this.counts.delete(key);
  }
}

export const WINDOW_MS = 15 * 60 * 1000;
const FORGOT_WINDOW_MS = 60 * 60 * 1000;
const UPLOAD_WINDOW_MS = 60 * 60 * 1000;
const MAX_DELAY_MS = 10_000;

export interface AccessLimitSettings {
  /** Failures per (account, address) pair before that pair waits out the window. */
  perPair: number;
  /** Failures per client address (any accounts) before the address waits out the window. */
  perAddress: number;
  /** Failures per account (any addresses) before its sign-ins are slowed down. */
  perAccount: number;
  /** The first delay once an account is over its limit; it doubles with each further failure. */
  slowdownMs: number;
  /** Reset e-mails per client address, and per target account, per hour. */
  forgotPerAddress: number;
  forgotPerAccount: number;
  /** Multipart uploads (photos, CSV and boundary files) per signed-in user, or per address, per hour. */
  uploadsPerHour: number;
}

/**
 * The account's delay before its password is checked: none up to `perAccount` failures, then
 * slowdownMs × 2^(failures − perAccount − 1), at most 10 s. With perAccount 5 and 500 ms: the
 * 6th failure in the window makes the next try wait 500 ms, the 7th 1 s, the 8th 2 s.
 */
export function accountDelayMs(failures: number, s: Pick<AccessLimitSettings, 'perAccount' | 'slowdownMs'>): number {
  if (failures <= s.perAccount) return 0;
  return Math.min(MAX_DELAY_MS, s.slowdownMs * 2 ** (failures - s.perAccount - 1));
}

const addressOf = (req: Request) => req.ip ?? 'unknown';
const emailOf = (req: Request) => (typeof req.body?.email === 'string' ? normaliseEmail(req.body.email) : '');
const sleep = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));

/**
 * Sign-in and reset-mail limits. A stranger cannot lock anyone out: refusals are per (account,
 * address) pair and per address, so they only ever hold up the address the failures came from;
 * an account attacked from many addresses is only slowed down, and its owner's correct password
 * from a clean address still signs in.
 */
export function accessLimits(settings: AccessLimitSettings, store: AttemptStore = new MemoryAttemptStore()) {
  const keys = (req: Request) => {
    const address = addressOf(req);
    const email = emailOf(req);
    return { pair: `pair:${email}|${address}`, address: `addr:${address}`, account: `acct:${email}` };
  };

  const signIn: RequestHandler = async (req, res, next) => {
    try {
      const k = keys(req);
      const [pair, address, account] = await Promise.all([store.count(k.pair), store.count(k.address), store.count(k.account)]);
      if (pair >= settings.perPair || address >= settings.perAddress) {
        throw new HttpError('rate_limited', 'Too many failed sign-ins from here. Wait 15 minutes, or ask an administrator to reset your password.');
      }
      const delay = accountDelayMs(account, settings);
      if (delay) await sleep(delay);
      // Failures (wrong password, unknown address, bad token) count once the answer is known, and
      // are written before the answer goes out: a client that tries again the moment it hears
      // "wrong password" finds the failure counted, also where the counters are in the database.
      // A successful sign-in clears its own pair.
      const end = res.end.bind(res) as unknown as (...args: unknown[]) => Response;
      res.end = ((...args: unknown[]) => {
        const failed = res.statusCode >= 400 && res.statusCode !== 429;
        const work = failed
          ? Promise.all([store.hit(k.pair, WINDOW_MS), store.hit(k.address, WINDOW_MS), k.account !== 'acct:' ? store.hit(k.account, WINDOW_MS) : 0])
          : res.statusCode < 400
            ? store.reset(k.pair)
            : null;
        if (!work) return end(...args);
        work.catch(() => undefined).then(() => end(...args));
        return res;
      }) as Response['end'];
      next();
    } catch (err) {
      next(err);
    }
  };

  /** True when a reset message may go out now; the page answers the same either way. */
  async function allowResetMail(req: Request, email: string): Promise<boolean> {
    const [byAddress, byAccount] = await Promise.all([
      store.hit(`forgot-addr:${addressOf(req)}`, FORGOT_WINDOW_MS),
      store.hit(`forgot-acct:${normaliseEmail(email)}`, FORGOT_WINDOW_MS),
    ]);
    return byAddress <= settings.forgotPerAddress && byAccount <= settings.forgotPerAccount;
  }

  /**
   * Counts every multipart upload (photos, registry and calibration CSVs, boundary files) before
   * its body is read, per user (per address when signed out), in the same store as the sign-in
   * counters, so every server counts against one limit.
   */
  const uploads: RequestHandler = async (req, _res, next) => {
    try {
      if (req.method === 'GET' || req.method === 'HEAD' || !req.is('multipart/form-data')) return next();
      const who = req.context?.user?.id ?? `addr:${addressOf(req)}`;
      const count = await store.hit(`upload:${who}`, UPLOAD_WINDOW_MS);
      if (count > settings.uploadsPerHour) {
        throw new HttpError(
          'rate_limited',
          `${settings.uploadsPerHour} files have been sent from this account in the last hour, the most this server takes. Nothing of this file was kept; wait a while, then send it again.`,
        );
      }
      next();
    } catch (err) {
      next(err);
    }
  };

  return { signIn, allowResetMail, uploads };
}

export type AccessLimits = ReturnType<typeof accessLimits>;
