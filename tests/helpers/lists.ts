/**
 * Checked reads from lists, for tests: each throws a message saying what was missing instead of
 * letting an `undefined` travel on to a confusing failure further down.
 */

/** The single element of `list`; throws unless there is exactly one. */
export function only<T>(list: readonly T[], what = 'item'): T {
  if (list.length !== 1) throw new Error(`expected exactly one ${what}, found ${list.length}`);
  return list[0] as T;
}

/** The element at `index` (negative counts from the end, as `Array.prototype.at`); throws when out of range. */
export function at<T>(list: readonly T[], index: number, what = 'item'): T {
  if (!Number.isInteger(index) || index >= list.length || index < -list.length) {
    throw new Error(`expected a ${what} at index ${index}, but there are ${list.length}`);
  }
  return list.at(index) as T;
}
