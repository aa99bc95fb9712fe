import { CalcError } from './errors';
import { zQuantile } from './t-dist';
import { requireLevel, requireNonNegative, requirePositive } from './validate';

export interface SampleSizeInput {
  /** Standard deviation of one plant's length (same unit as delta). */
  sd: number;
  /** The shift to detect: distance from the mean to the threshold length. */
  delta: number;
  /** Significance level α of the test (1 − the rule's confidence). */
  alpha: number;
  /** Wanted power 1 − β. Default 0.8. */
  power?: number;
  /** 'two': z(1 − α/2), as for a two-sided interval; 'one': z(1 − α), as for a one-sided bound. */
  sided: 'one' | 'two';
  /**
   * Variance of the compared mean that more plants do not reduce (the calibration's part, in the
   * unit of delta squared). Default 0: the handbook's case.
   */
  fixedVariance?: number;
}

export interface SampleSize {
  /** Total plants N (the smallest whole number meeting the formula); null when no N can. */
  total: number | null;
  /** (z_a + z_b)², the factor of the formula, for showing the working. */
  factor: number;
  zAlpha: number;
  zBeta: number;
}

/**
 * Sample size of a one-sample test of a mean (NIST/SEMATECH e-Handbook of Statistical Methods,
 * 7.2.2.2): N ≥ (z_a + z_b)²·σ²/δ², z_a = z(1 − α/2) two-sided or z(1 − α) one-sided, z_b = z(1 − β).
 * With a fixed part v of the variance that plants cannot reduce the condition
 * (z_a + z_b)²·(σ²/N + v) ≤ δ² gives N ≥ (z_a + z_b)²·σ² / (δ² − (z_a + z_b)²·v), and no N when the
 * denominator is not positive. Normal quantiles, as the handbook's formula; with σ estimated from
 * ten plants a t-based iteration would add a plant or two.
 */
export function sampleSizeForMean(input: SampleSizeInput): SampleSize {
  const sd = requireNonNegative(input?.sd, 'sd');
  const delta = requirePositive(input.delta, 'delta');
  const alpha = requireLevel(input.alpha, 'alpha');
  const power = requireLevel(input.power ?? 0.8, 'power');
  const v = requireNonNegative(input.fixedVariance ?? 0, 'fixedVariance');
  if (input.sided !== 'one' && input.sided !== 'two') {
    throw new CalcError('bad_option', "sided must be 'one' or 'two'.", 'sided');
  }
  const zAlpha = zQuantile(input.sided === 'two' ? 1 - alpha / 2 : 1 - alpha);
  const zBeta = zQuantile(power);
  const factor = (zAlpha + zBeta) ** 2;
  const room = delta * delta - factor * v;
  if (!(room > 0)) return { total: null, factor, zAlpha, zBeta };
  const total = sd === 0 ? 1 : Math.max(1, Math.ceil((factor * sd * sd) / room - 1e-9));
  return { total, factor, zAlpha, zBeta };
}
