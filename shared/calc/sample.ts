import { CalcError } from './errors';
import { tCritical } from './t-dist';
import { requireLevel, requireNumberArray } from './validate';

export interface SampleSummary {
  n: number;
  mean: number;
  /** Sample standard deviation (n − 1 divisor). */
  sd: number;
  /** Standard error of the mean, sd / √n. */
  se: number;
  /** Coefficient of variation sd / mean as a fraction (0.12 = 12 %); null when the mean is 0. */
  cv: number | null;
  level: number;
  /** t-based confidence interval of the mean at `level`. */
  ci: [number, number];
}

export function summarizeSample(values: number[], level = 0.95): SampleSummary {
  const xs = requireNumberArray(values, 'values');
  requireLevel(level);
  const n = xs.length;
  if (n < 2) {
    throw new CalcError('too_few_points', 'A sample summary needs at least 2 values (one value has no spread).', 'values');
  }
  // Two-pass (mean, then squared deviations): stable for lengths and biomass magnitudes alike.
  let sum = 0;
  for (const v of xs) sum += v;
  // Equal values have no spread; their sum can leave rounding dust (ten × 81.28 gives sd 1.5e-14).
  const equal = xs.every((v) => v === xs[0]);
  const mean = equal ? xs[0]! : sum / n; // n ≥ 2 (checked above)
  let ss = 0;
  for (const v of xs) ss += (v - mean) * (v - mean);
  const sd = Math.sqrt(ss / (n - 1));
  const se = sd / Math.sqrt(n);
  const half = tCritical(level, n - 1) * se;
  return { n, mean, sd, se, cv: mean === 0 ? null : sd / mean, level, ci: [mean - half, mean + half] };
}
