/** A json column's value as an object: PostgreSQL parses json itself, SQLite hands back the text. */
export function jsonValue<T>(value: unknown): T | null {
  if (value === null || value === undefined) return null;
  return (typeof value === 'string' ? JSON.parse(value) : value) as T;
}
