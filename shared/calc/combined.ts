import { CalcError } from './errors';
import { isLogModel, type Fit } from './fit-types';
import { assertFit, leverageAt, linearPredictor } from './predict';
import { tQuantile } from './t-dist';
import { requireLevel } from './validate';

/*
 * The combined interval of a field's biomass: the calibration's uncertainty at the mean length and
 * the sampling uncertainty of that mean, joined by the law of propagation of uncertainty (JCGM
 * 100:2008 "GUM" 5.1.2; H. H. Ku, J. Res. NBS 70C, 1966) on the scale where the model is linear
 * (ln biomass for the power and exponential models), with the curve's slope at the mean length as
 * the sensitivity coefficient. Degrees of freedom by Welch–Satterthwaite (GUM G.4.1). The choice of
 * the single-plot prediction variance for the calibration part is argued in shared/calc/README.md.
 */

/** The plants of one walk, reduced to what the interval needs. sdCm is null with one plant. */
export interface SampleStats {
  n: number;
  meanCm: number;
  sdCm: number | null;
}

export interface CombinedInterval {
  /** Two-sided coverage of `interval`, and one-sided coverage of `lowerBound`/`upperBound`. */
  level: number;
  /** 'log': the uncertainties below are on the ln(biomass) scale; 'linear': in kg/ha. */
  scale: 'linear' | 'log';
  /** False with one plant or when every length is the same: the spread is then unknown. */
  spreadKnown: boolean;
  /** Two-sided interval of the field's biomass, kg/ha (floored at 0); null when the spread is unknown. */
  interval: [number, number] | null;
  /** One-sided lower bound at `level`, kg/ha (floored at 0); null when the spread is unknown. */
  lowerBound: number | null;
  /** One-sided upper bound at `level`, kg/ha; null when the spread is unknown. */
  upperBound: number | null;
  /** The calibration part alone (as if infinitely many plants were measured): the narrowest the interval can get. */
  calibrationOnly: [number, number];
  /** Standard uncertainties on `scale`: calibration (single-plot prediction), sampling, combined. */
  uCalibration: number;
  uSampling: number | null;
  uCombined: number | null;
  /** d(model scale)/d(length) at the mean length, per cm. */
  slopePerCm: number;
  dfCalibration: number;
  dfSampling: number | null;
  /** Welch–Satterthwaite effective degrees of freedom of uCombined. */
  dfEffective: number | null;
}

/** Mean and sample standard deviation (n − 1) of positive finite lengths. */
export function sampleStats(lengthsCm: readonly number[]): SampleStats {
  if (!Array.isArray(lengthsCm) || lengthsCm.length === 0) {
    throw new CalcError('empty', 'Enter at least one main shoot length.', 'lengthsCm');
  }
  lengthsCm.forEach((v, i) => {
    if (typeof v !== 'number' || !Number.isFinite(v)) {
      throw new CalcError('not_finite', `Plant ${i + 1}: the length is not a number.`, 'lengthsCm');
    }
    if (v <= 0) throw new CalcError('non_positive', `Plant ${i + 1}: a length must be greater than zero.`, 'lengthsCm');
  });
  const n = lengthsCm.length;
  let sum = 0;
  for (const v of lengthsCm) sum += v;
  const mean = sum / n;
  if (n < 2) return { n, meanCm: mean, sdCm: null };
  // Equal lengths have no spread; summing them can leave rounding dust (ten × 81.28 gives 1.5e-14).
  if (lengthsCm.every((v) => v === lengthsCm[0])) return { n, meanCm: lengthsCm[0], sdCm: 0 };
  let ss = 0;
  for (const v of lengthsCm) ss += (v - mean) * (v - mean);
  return { n, meanCm: mean, sdCm: Math.sqrt(ss / (n - 1)) };
}

/** Slope of the model's linear scale (y, or ln y) against length, at x. */
export function modelSlopeAt(fit: Fit, x: number): number {
  const c = fit.coefficients;
  switch (fit.model) {
    case 'linear':
    case 'exponential':
      return c[1]!;
    case 'quadratic':
      return c[1]! + 2 * c[2]! * x;
    case 'power':
      return c[1]! / x;
  }
}

function checkSample(s: SampleStats): SampleStats {
  const ok =
    typeof s === 'object' && s !== null && Number.isInteger(s.n) && s.n >= 1 &&
    typeof s.meanCm === 'number' && Number.isFinite(s.meanCm) && s.meanCm > 0 &&
    (s.sdCm === null || (typeof s.sdCm === 'number' && Number.isFinite(s.sdCm) && s.sdCm >= 0));
  if (!ok) throw new CalcError('bad_option', 'The sample needs a whole number of plants, a positive mean length and a spread.', 'sample');
  return s;
}

/**
 * The combined interval at `level` (two-sided) and the one-sided bounds at the same level.
 *   u_cal² = s²·(1 + q(x̄))            single-plot prediction variance of the calibration at x̄
 *   u_smp² = (dη/dx at x̄)²·sd²/n       sampling variance of the mean length, carried through the curve
 *   u_c²   = u_cal² + u_smp²           GUM 5.1.2 (the two are independent)
 *   ν_eff  = u_c⁴ / (u_cal⁴/ν_cal + u_smp⁴/(n − 1))   Welch–Satterthwaite, GUM G.4.1
 *   η̂ ± t(ν_eff)·u_c, back-transformed by exp for the log models (no smearing: these are quantiles).
 */
export function combinedInterval(fit: Fit, sample: SampleStats, options: { level?: number } = {}): CombinedInterval {
  assertFit(fit);
  const s = checkSample(sample);
  const level = options.level ?? 0.9;
  requireLevel(level);
  const x = s.meanCm;
  const log = isLogModel(fit.model);
  const eta = linearPredictor(fit, x);
  const back = (v: number) => (log ? Math.exp(v) : Math.max(0, v));
  const q = Math.max(0, leverageAt(fit, x));
  const uCal = fit.residualStdError * Math.sqrt(1 + q);
  const slope = modelSlopeAt(fit, x);
  const kCal = tQuantile((1 + level) / 2, fit.df);
  const calibrationOnly: [number, number] = [back(eta - kCal * uCal), back(eta + kCal * uCal)];
  const base = {
    level,
    scale: log ? ('log' as const) : ('linear' as const),
    calibrationOnly,
    uCalibration: uCal,
    slopePerCm: slope,
    dfCalibration: fit.df,
  };
  if (s.n < 2 || s.sdCm === null || !(s.sdCm > 0)) {
    return {
      ...base, spreadKnown: false, interval: null, lowerBound: null, upperBound: null,
      uSampling: null, uCombined: null, dfSampling: s.n >= 2 ? s.n - 1 : null, dfEffective: null,
    };
  }
  const uSmp = (Math.abs(slope) * s.sdCm) / Math.sqrt(s.n);
  const dfSmp = s.n - 1;
  const u2 = uCal * uCal + uSmp * uSmp;
  const uc = Math.sqrt(u2);
  const denom = uCal ** 4 / fit.df + uSmp ** 4 / dfSmp;
  const nu = denom > 0 ? (u2 * u2) / denom : Infinity;
  const k2 = tQuantile((1 + level) / 2, nu);
  const k1 = tQuantile(level, nu);
  return {
    ...base,
    spreadKnown: true,
    interval: [back(eta - k2 * uc), back(eta + k2 * uc)],
    lowerBound: back(eta - k1 * uc),
    upperBound: back(eta + k1 * uc),
    uSampling: uSmp,
    uCombined: uc,
    dfSampling: dfSmp,
    dfEffective: nu,
  };
}
