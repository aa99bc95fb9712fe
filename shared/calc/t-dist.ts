import jStat from 'jstat';
import { CalcError } from './errors';
import { requireLevel } from './validate';

/*
 * Student's t quantiles come from jstat (studentt.inv, accurate to about 1e-8 relative, far below
 * what any figure here is shown to). Two-sided critical values are memoised per (df, level):
 * an estimate on the phone asks for the same one or two values after every plant entered, and the
 * inverse costs microseconds while a Map lookup costs nanoseconds.
 */
const cache = new Map<string, number>();
const CACHE_LIMIT = 4096; // a bound, so a long-lived server cannot grow it without end

/** Lower-tail quantile: P(T ≤ q) = p for T ~ t(df). */
export function tQuantile(p: number, df: number): number {
  if (typeof p !== 'number' || !(p > 0 && p < 1)) {
    throw new CalcError('bad_level', 'The probability must be between 0 and 1.', 'p');
  }
  if (typeof df !== 'number' || !Number.isFinite(df) || df < 1) {
    throw new CalcError('too_few_points', 'The t distribution needs at least 1 degree of freedom.', 'df');
  }
  return jStat.studentt.inv(p, df);
}

/** Two-sided critical value t such that P(|T| ≤ t) = level. Memoised. */
export function tCritical(level: number, df: number): number {
  requireLevel(level);
  const key = `${df}|${level}`;
  const hit = cache.get(key);
  if (hit !== undefined) return hit;
  const v = tQuantile((1 + level) / 2, df);
  if (cache.size >= CACHE_LIMIT) cache.clear();
  cache.set(key, v);
  return v;
}
