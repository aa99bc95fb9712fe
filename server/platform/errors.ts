import type { ErrorRequestHandler, Request } from 'express';
import { ZodError } from 'zod';
import type { Logger } from 'pino';
import { makeFormatter } from './format';
import type { Role } from './roles';
import { loggedPath } from './request-log';

/** Stable error codes of the JSON API (README, "API"); tests assert these, not the wording. */
export type ErrorCode =
  | 'invalid'
  | 'unauthenticated'
  | 'forbidden'
  | 'own_walk'
  | 'csrf'
  | 'not_found'
  | 'conflict'
  | 'too_large'
  | 'unsupported_type'
  | 'rate_limited'
  | 'storage_unavailable'
  | 'storage_full'
  | 'internal';

const statusOf: Record<ErrorCode, number> = {
  invalid: 400,
  unauthenticated: 401,
  forbidden: 403,
  own_walk: 403,
  csrf: 403,
  not_found: 404,
  conflict: 409,
  too_large: 413,
  unsupported_type: 415,
  rate_limited: 429,
  storage_unavailable: 503,
  storage_full: 507,
  internal: 500,
};

const defaultMessage: Record<ErrorCode, string> = {
  invalid: 'Some values are not valid.',
  unauthenticated: 'Please sign in.',
  forbidden: 'Your role does not allow this.',
  own_walk: 'Another reviewer must approve this walk.',
  csrf: 'The form or request was missing its security token. Reload the page and try again.',
  not_found: 'Nothing was found here.',
  conflict: 'This conflicts with the stored record.',
  too_large: 'The upload is too large.',
  unsupported_type: 'This type of content is not accepted here.',
  rate_limited: 'Too many attempts. Please wait a few minutes and try again.',
  storage_unavailable: 'The server cannot write to its storage just now. Nothing was saved; try again later.',
  storage_full: "The server's disk is full. Nothing was saved; ask your administrator to free space.",
  internal: 'Something went wrong on our side. The error was logged.',
};

export class HttpError extends Error {
  readonly status: number;
  constructor(
    readonly code: ErrorCode,
    message?: string,
    readonly fields?: Record<string, string>,
  ) {
    super(message ?? defaultMessage[code]);
    this.status = statusOf[code];
  }
}

/** zod issues as `{ "path.to.field": "message" }`, the shape of `error.fields`. */
export function fieldsOf(error: ZodError): Record<string, string> {
  const fields: Record<string, string> = {};
  for (const issue of error.issues) {
    const key = issue.path.length ? issue.path.join('.') : '_';
    if (!(key in fields)) fields[key] = issue.message;
  }
  return fields;
}

export function isApiRequest(req: Request): boolean {
  return req.originalUrl.startsWith('/api/') || req.originalUrl === '/api';
}

/** Maps whatever was thrown (ours, zod's, body-parser's, lusca's, multer's) to one HttpError. */
export function toHttpError(err: unknown, statusSoFar: number): HttpError {
  if (err instanceof HttpError) return err;
  if (err instanceof ZodError) return new HttpError('invalid', undefined, fieldsOf(err));
  const e = err as { type?: string; code?: string; status?: number; message?: string };
  if (e?.type === 'entity.parse.failed') return new HttpError('invalid', 'The request body is not valid JSON.');
  if (e?.type === 'entity.too.large' || e?.code === 'LIMIT_FILE_SIZE') return new HttpError('too_large');
  if (e?.type === 'charset.unsupported' || e?.type === 'encoding.unsupported') return new HttpError('unsupported_type');
  // lusca sets 403 on the response and passes a plain Error (docs/server-notes.md, 3).
  if (statusSoFar === 403 && typeof e?.message === 'string' && e.message.startsWith('CSRF token')) {
    return new HttpError('csrf');
  }
  if (typeof e?.status === 'number' && e.status >= 400 && e.status < 500) {
    const byStatus: Record<number, ErrorCode> = { 400: 'invalid', 404: 'not_found', 413: 'too_large', 415: 'unsupported_type' };
    return new HttpError(byStatus[e.status] ?? 'invalid');
  }
  return new HttpError('internal');
}

/**
 * The one error middleware: JSON `{error: {code, message, fields?}}` under /api, a friendly page
 * elsewhere; a signed-out visitor to an office page goes to the sign-in page and back.
 */
/** `permissionsFor` gives an error page the signed-in role's `can` (passed in: the permissions map's guards throw these errors). */
export function errorHandler(logger: Logger, permissionsFor: (role: Role | undefined) => (action: never) => boolean): ErrorRequestHandler {
  return (err, req, res, _next) => {
    const httpError = toHttpError(err, res.statusCode);
    // In full (message, stack, cause), with the request line's id; the path as the request log writes it.
    const where = { err, reqId: req.requestId, method: req.method, path: loggedPath(req.originalUrl) };
    if (httpError.code === 'internal') logger.error(where, 'unhandled error');
    else if (httpError.status >= 500) logger.error(where, 'storage error');
    if (res.headersSent) return;
    res.status(httpError.status);
    if (isApiRequest(req)) {
      const body: Record<string, unknown> = { code: httpError.code, message: httpError.message };
      if (httpError.fields) body.fields = httpError.fields;
      res.json({ error: body });
      return;
    }
    if (httpError.code === 'unauthenticated' && req.method === 'GET') {
      res.redirect(`/login?next=${encodeURIComponent(req.originalUrl)}`);
      return;
    }
    const locals = {
      title: httpError.status === 404 ? 'Not found' : httpError.status === 403 ? 'Not allowed' : 'Something went wrong',
      status: httpError.status,
      code: httpError.code,
      message: httpError.message,
    };
    // The page's usual locals are set by middleware that may not have run (a body too large is
    // refused before the session is read): fill in whatever is missing so the page always renders.
    const context = req.context;
    const pageDefaults: Record<string, unknown> = {
      user: context?.user ?? null,
      can: permissionsFor(context?.user?.role),
      currentPath: req.path,
      fmt: makeFormatter(context?.units ?? 'us', false),
      csrfToken: '',
      flash: null,
    };
    for (const [key, value] of Object.entries(pageDefaults)) if (res.locals[key] === undefined) res.locals[key] = value;
    res.render('error', locals, (renderErr, html) => {
      if (renderErr) {
        // Never show a stack trace: fall back to plain words.
        logger.error({ err: renderErr }, 'error page failed to render');
        res.type('text').send(`${locals.title}: ${locals.message}`);
        return;
      }
      res.send(html);
    });
  };
}

/** Unknown paths: 404 in the answer's proper form. */
export const notFound = () => {
  throw new HttpError('not_found');
};
