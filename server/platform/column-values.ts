/*
 * Column values as the two engines hand them back, read one way: PostgreSQL parses json and gives
 * timestamps and dates as Date objects and booleans as true/false; SQLite gives the stored text and
 * 0/1. Every db module maps its rows with these.
 */

/** A json column's value as an object, or null (also for empty text): PostgreSQL parses json itself, SQLite hands back the text. */
export function jsonValue<T>(value: unknown): T | null {
  if (value === null || value === undefined || value === '') return null;
  return (typeof value === 'string' ? JSON.parse(value) : value) as T;
}

/** A timestamp column as ISO 8601 text (2027-03-15T10:20:00.000Z), or null (also for empty text). */
export const isoTime = (v: unknown): string | null => (v == null || v === '' ? null : v instanceof Date ? v.toISOString() : String(v));

/** A date column as YYYY-MM-DD, or null (also for empty text). */
export const isoDay = (v: unknown): string | null => (v == null || v === '' ? null : v instanceof Date ? v.toISOString().slice(0, 10) : String(v).slice(0, 10));

/** A boolean column or expression: true/false on PostgreSQL, 1/0 (as a number or text) on SQLite. */
export const flag = (v: unknown): boolean => v === true || Boolean(Number(v));
