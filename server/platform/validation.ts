import type { RequestHandler } from 'express';
import type { ZodType } from 'zod';
import { HttpError, fieldsOf } from './errors';

/** JSON API bodies: parse with the shared zod schema and hand the parsed value on as req.body. */
export function validateBody<T>(schema: ZodType<T>): RequestHandler {
  return (req, _res, next) => {
    const result = schema.safeParse(req.body ?? {});
    if (!result.success) throw new HttpError('invalid', undefined, fieldsOf(result.error));
    req.body = result.data;
    next();
  };
}

/** Query strings likewise, kept on res.locals.query (req.query is read-only in Express 5). */
export function validateQuery<T>(schema: ZodType<T>): RequestHandler {
  return (req, res, next) => {
    const result = schema.safeParse(req.query);
    if (!result.success) throw new HttpError('invalid', undefined, fieldsOf(result.error));
    res.locals.query = result.data;
    next();
  };
}

/** Office forms: the parsed value, or field messages to show inline beside each input. */
export function parseForm<T>(
  schema: ZodType<T>,
  body: unknown,
): { ok: true; value: T } | { ok: false; errors: Record<string, string> } {
  const result = schema.safeParse(body ?? {});
  return result.success ? { ok: true, value: result.data } : { ok: false, errors: fieldsOf(result.error) };
}
