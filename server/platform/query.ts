import { z } from 'zod';

/**
 * List query strings: an empty value (`?season=&crop=`, as forms send them) means "not given";
 * anything else must parse, so `limit=9999` or `sort=password` answers 400 rather than a default.
 */
export function listQuery<T extends z.ZodType>(schema: T) {
  return z.preprocess(
    (v) => (v && typeof v === 'object' ? Object.fromEntries(Object.entries(v).filter(([, value]) => value !== '')) : v),
    schema,
  );
}

/** A free-text filter: one value, of a sensible length. */
export const searchText = z.string({ message: 'Give one search text.' }).trim().max(200, 'Use at most 200 characters.');
/** An id filter (`?ranchId=`): one value; an unknown or foreign id simply matches nothing. */
export const idFilter = z.string({ message: 'Give one id.' }).max(100, 'That is not an id.');
