/**
 * For a value that cannot be missing by construction (the row an `insert … returning` gave back,
 * the element of a list whose length was just checked): returns it, or throws an Error naming what
 * was missing. Such a throw is a bug, answered as a 500 by the error middleware. Where a missing
 * value is a real case (an unknown id, an empty file), answer it instead: a 404, a plain message
 * or a default.
 */
export function expectDefined<T>(value: T | undefined, what: string): T {
  if (value === undefined) throw new Error(`${what} is missing, which cannot happen: a bug`);
  return value;
}
