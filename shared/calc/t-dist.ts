import quantile from '@stdlib/stats-base-dists-t-quantile';
import { CalcError } from './errors';
import { requireLevel } from './validate';

/*
 * Student's t quantiles from @stdlib (inverse of the regularised incomplete beta function, to
 * about 1e-15 relative; tests/shared/t-dist.test.ts checks 1e-12 against the closed forms for 1, 2
 * and 4 degrees of freedom). Two-sided critical values are memoised per (df, level): the phone asks
 * for the same one or two values after every plant entered.
 */
const cache = new Map<string, number>();
const CACHE_LIMIT = 4096; // a bound, so a long-lived server cannot grow it without end

/** Lower-tail quantile: P(T ≤ q) = p for T ~ t(df). df need not be a whole number (Welch–Satterthwaite). */
export function tQuantile(p: number, df: number): number {
  if (typeof p !== 'number' || !(p > 0 && p < 1)) {
    throw new CalcError('bad_level', 'The probability must be between 0 and 1.', 'p');
  }
  if (typeof df !== 'number' || Number.isNaN(df) || df < 1) {
    throw new CalcError('too_few_points', 'The t distribution needs at least 1 degree of freedom.', 'df');
  }
  // stdlib's inverse loses the tail beyond about 1e15 degrees of freedom; at 1e14 the t quantile is
  // the normal one to about 1e-14 (the gap is (z³ + z)/(4·df)), so larger df, Infinity included, use 1e14.
  return quantile(p, Math.min(df, 1e14));
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

/** Standard normal quantile Φ⁻¹(p) (the t quantile with unbounded degrees of freedom), to about 1e-14. */
export function zQuantile(p: number): number {
  return tQuantile(p, Infinity);
}
