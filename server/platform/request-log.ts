import { randomBytes } from 'node:crypto';
import type { RequestHandler } from 'express';
import type { Logger } from 'pino';

/**
 * One compact line per request, written when the answer has gone (or the client went away):
 * `{"reqId","method","path","status","ms","userId","msg":"request"}` beside pino's level, time,
 * pid and host. Never headers, cookies, bodies or the query string (search text, a `next` address);
 * the token of a one-time link (/password/reset/…, /invite/…) is written as `:token`. Errors are
 * logged in full apart, with the same reqId (server/platform/errors.ts).
 *
 * Mounted only when the log level shows info lines: at LOG_LEVEL=warn requests cost no logging
 * work at all. Health checks are not logged.
 */

/** A request id from a proxy in front (X-Request-Id) is kept when it is short and plain. */
const PLAIN_ID = /^[A-Za-z0-9._:-]{1,64}$/;
const ONE_TIME_LINK = /^(\/password\/reset\/|\/invite\/)[^/]+/;
const QUIET = new Set(['/healthz', '/readyz']);

/** The path as logged: no query string, no one-time token. */
export function loggedPath(originalUrl: string): string {
  const q = originalUrl.indexOf('?');
  const path = q === -1 ? originalUrl : originalUrl.slice(0, q);
  return path.replace(ONE_TIME_LINK, '$1:token');
}

export function requestLog(logger: Logger): RequestHandler | null {
  if (!logger.isLevelEnabled('info')) return null;
  // Ids unique across restarts and processes: a random prefix per process, then a counter.
  const prefix = randomBytes(4).toString('hex');
  let counter = 0;
  return (req, res, next) => {
    if (QUIET.has(req.path)) return next();
    const started = performance.now();
    const incoming = req.headers['x-request-id'];
    const reqId = typeof incoming === 'string' && PLAIN_ID.test(incoming) ? incoming : `${prefix}-${(++counter).toString(36)}`;
    req.requestId = reqId;
    res.setHeader('X-Request-Id', reqId);
    // 'close' comes once per answer, after 'finish' when it was sent whole: one listener for both.
    res.once('close', () => {
      const aborted = !res.writableFinished;
      logger.info(
        {
          reqId,
          method: req.method,
          path: loggedPath(req.originalUrl),
          status: aborted ? 499 : res.statusCode, // 499: the client closed the connection first
          ms: Math.round((performance.now() - started) * 10) / 10,
          userId: req.user?.id ?? null,
        },
        'request',
      );
    });
    next();
  };
}
