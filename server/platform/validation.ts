import type { RequestHandler } from 'express';
import { z, type ZodType } from 'zod';
import { plainErrors } from '../../shared/schemas/plain-errors';
import { HttpError, fieldsOf } from './errors';

/*
 * Every parse of what a person typed or sent gets the plain-words messages of
 * shared/schemas/plain-errors.ts wherever its schema has no message of its own; the same words are
 * zod's default on the server, for a schema parsed anywhere else and thrown (errors.ts answers it).
 */
z.config({ customError: plainErrors });

/** JSON API bodies: parse with the shared zod schema and hand the parsed value on as req.body. */
export function validateBody<T>(schema: ZodType<T>): RequestHandler {
  return (req, _res, next) => {
    const result = schema.safeParse(req.body ?? {}, { error: plainErrors });
    if (!result.success) throw new HttpError('invalid', undefined, fieldsOf(result.error));
    req.body = result.data;
    next();
  };
}

/** Query strings likewise, kept on res.locals.query (req.query is read-only in Express 5). */
export function validateQuery<T>(schema: ZodType<T>): RequestHandler {
  return (req, res, next) => {
    const result = schema.safeParse(req.query, { error: plainErrors });
    if (!result.success) throw new HttpError('invalid', undefined, fieldsOf(result.error));
    res.locals.query = result.data;
    next();
  };
}

/**
 * Office forms: the parsed value, or field messages to show inline beside each input. A message on
 * a part of a field ("contactEmails.1") is also given under the field's own name, the input it sits beside.
 */
export function parseForm<T>(
  schema: ZodType<T>,
  body: unknown,
): { ok: true; value: T } | { ok: false; errors: Record<string, string> } {
  const result = schema.safeParse(body ?? {}, { error: plainErrors });
  if (result.success) return { ok: true, value: result.data };
  const errors = fieldsOf(result.error);
  for (const [key, message] of Object.entries(errors)) {
    const [top = key] = key.split('.');
    if (top !== key) errors[top] ??= message;
  }
  return { ok: false, errors };
}
