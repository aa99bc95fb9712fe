import { CalcError } from './errors';
import type { Fit } from './fit-types';
import { formatNumber } from '../format/figures';
import { lengthForBiomass } from './inverse';
import { assertFit, curveRange, interval, predict } from './predict';
import { tCritical } from './t-dist';
import { CM_PER_IN, kgPerHaToLbPerAc } from './units';
import { requireLevel, requirePositive } from './validate';

/** One plant per stop, about 10 stops: the usual field sample (common practice, no published source). */
export const USUAL_SAMPLE_SIZE = 10;
/** Above this, "more plants" stops being useful advice: the mean sits on the threshold. */
export const MAX_PLANTS_SUGGESTED = 500;

export interface EstimateOptions {
  thresholdKgHa: number;
  /** Level of the prediction interval and of the sampling range. Default 0.9. */
  level?: number;
  /** Units used in the plain-words note. Default 'us' (in, lb/ac), as the trade reads them. */
  units?: 'us' | 'metric';
}

export interface BiomassEstimate {
  n: number;
  meanLengthCm: number;
  /** null with a single plant. */
  sdLengthCm: number | null;
  biomassKgHa: number;
  /** Prediction interval of the field's biomass at the mean length (floored at 0). */
  interval: [number, number];
  /** The t-interval of the mean length carried through the curve; null with a single plant. */
  samplingRange: [number, number] | null;
  thresholdKgHa: number;
  /** The rule's own test: point estimate ≥ threshold. */
  meetsThreshold: boolean;
  /** Mean length outside the calibrated length range. */
  extrapolated: boolean;
  /** When the sampling range straddles the threshold: how many more plants would likely settle it
   *  (assuming the observed mean and spread hold). 0 when already settled; null when it cannot be said
   *  (one plant, all lengths equal, or the mean sits on the threshold). */
  morePlantsSuggested: number | null;
  /** Mean length at which this calibration reaches the threshold (extrapolating if need be), or null. */
  lengthForThresholdCm: number | null;
  level: number;
  note: string;
}

function validLengths(lengths: unknown): number[] {
  if (!Array.isArray(lengths) || lengths.length === 0) {
    throw new CalcError('empty', 'Enter at least one main shoot length.', 'lengthsCm');
  }
  lengths.forEach((v, i) => {
    if (typeof v !== 'number' || !Number.isFinite(v)) {
      throw new CalcError('not_finite', `Plant ${i + 1}: the length is not a number.`, 'lengthsCm');
    }
    if (v <= 0) throw new CalcError('non_positive', `Plant ${i + 1}: a length must be greater than zero.`, 'lengthsCm');
  });
  return lengths as number[];
}

/** Smallest total m > n with t(level, m−1)·sd/√m < d, i.e. the sampling interval excludes the threshold. */
function plantsNeeded(n: number, sd: number, d: number, level: number): number | null {
  if (!(d > 0) || !(sd > 0)) return null;
  const ok = (m: number) => (tCritical(level, m - 1) * sd) / Math.sqrt(m) < d;
  if (!ok(MAX_PLANTS_SUGGESTED)) return null;
  // Upper bound from the current (larger) t value, then bisect: ok(m) only improves as m grows.
  let hi = Math.min(MAX_PLANTS_SUGGESTED, Math.max(n + 1, Math.ceil(((tCritical(level, n - 1) * sd) / d) ** 2) + 1));
  if (!ok(hi)) hi = MAX_PLANTS_SUGGESTED;
  let lo = n + 1;
  if (lo > hi) return null;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (ok(mid)) hi = mid;
    else lo = mid + 1;
  }
  return lo;
}

/**
 * Biomass for one field walk from its main shoot lengths (cm) and a calibration fit (cm → kg/ha).
 * Works from the first plant on; the phone calls it after every entry.
 */
export function estimateBiomass(fit: Fit, lengthsCm: number[], options: EstimateOptions): BiomassEstimate {
  assertFit(fit);
  const lengths = validLengths(lengthsCm);
  const threshold = requirePositive(options?.thresholdKgHa, 'thresholdKgHa');
  const level = options.level ?? 0.9;
  requireLevel(level);
  const us = (options.units ?? 'us') === 'us';

  const n = lengths.length;
  let sum = 0;
  for (const v of lengths) sum += v;
  const mean = sum / n;
  let sd: number | null = null;
  if (n >= 2) {
    let ss = 0;
    for (const v of lengths) ss += (v - mean) * (v - mean);
    sd = Math.sqrt(ss / (n - 1));
  }

  const biomass = Math.max(0, predict(fit, mean));
  const pi = interval(fit, mean, { level, kind: 'prediction' });
  const piOut: [number, number] = [Math.max(0, pi[0]), Math.max(0, pi[1])];
  const [x0, x1] = fit.xRange;
  const extrapolated = mean < x0 || mean > x1;
  const meets = biomass >= threshold;

  const inv = lengthForBiomass(fit, threshold, { extrapolate: true });
  const lengthForThresholdCm = inv.ok ? inv.x : null;

  let samplingRange: [number, number] | null = null;
  let more: number | null = null;
  if (sd !== null) {
    const half = (tCritical(level, n - 1) * sd) / Math.sqrt(n);
    const lenLo = mean - half;
    const lenHi = mean + half;
    // A power curve is only defined for positive lengths; below zero length, zero biomass.
    if (fit.model === 'power' && lenLo <= 0) {
      samplingRange = [0, Math.max(0, predict(fit, lenHi))];
    } else {
      const r = curveRange(fit, lenLo, lenHi);
      samplingRange = [Math.max(0, r[0]), Math.max(0, r[1])];
    }
    const straddles = samplingRange[0] < threshold && threshold < samplingRange[1];
    // Equal lengths leave the spread unknown, not zero: never call that settled.
    if (sd === 0) more = null;
    else if (!straddles) more = 0;
    else if (lengthForThresholdCm !== null) {
      const m = plantsNeeded(n, sd, Math.abs(mean - lengthForThresholdCm), level);
      more = m === null ? null : Math.max(1, m - n);
    }
  }

  // Plain words, in the user's units.
  const len = (cm: number) => (us ? `${formatNumber(cm / CM_PER_IN, 1)} in` : `${formatNumber(cm, 1)} cm`);
  const mass = (kg: number) => (us ? formatNumber(kgPerHaToLbPerAc(kg)) : formatNumber(kg));
  const mu = us ? 'lb/ac' : 'kg/ha';
  const pct = Math.round(level * 100);
  const parts: string[] = [];
  parts.push(
    `Estimated ${mass(biomass)} ${mu} at a mean main shoot length of ${len(mean)} (${n} plant${n === 1 ? '' : 's'}): ` +
      (meets ? `meets the ${mass(threshold)} ${mu} threshold.` : `below the ${mass(threshold)} ${mu} threshold.`),
  );
  if (extrapolated) {
    parts.push(
      `The mean length is outside the calibrated range (${len(x0)} to ${len(x1)}), so this is an extrapolation; treat it with caution.`,
    );
  }
  if (samplingRange === null) {
    parts.push('With one plant there is no sampling range yet; it appears from the second plant on.');
  } else if (sd === 0) {
    parts.push('All lengths are the same, so the spread between plants is unknown and the sampling range cannot be judged; check the entries and measure more plants.');
  } else if (more === 0) {
    const side = samplingRange[0] >= threshold ? 'above' : 'below';
    parts.push(
      `The ${pct}% sampling range (${mass(samplingRange[0])} to ${mass(samplingRange[1])} ${mu}) lies ${side} the threshold, so more plants would likely not change the verdict.`,
    );
  } else if (more !== null) {
    parts.push(
      `The ${pct}% sampling range (${mass(samplingRange[0])} to ${mass(samplingRange[1])} ${mu}) spans the threshold: about ${more} more plant${more === 1 ? '' : 's'} would likely settle it.`,
    );
  } else if (lengthForThresholdCm === null) {
    parts.push(
      `The ${pct}% sampling range (${mass(samplingRange[0])} to ${mass(samplingRange[1])} ${mu}) spans the threshold; this curve cannot say how many more plants would settle it.`,
    );
  } else {
    parts.push(
      `The ${pct}% sampling range (${mass(samplingRange[0])} to ${mass(samplingRange[1])} ${mu}) spans the threshold and the mean sits very close to it, so more plants are unlikely to settle it.`,
    );
  }
  if (n < USUAL_SAMPLE_SIZE) parts.push(`The usual sample is ${USUAL_SAMPLE_SIZE} plants, one per stop.`);

  return {
    n,
    meanLengthCm: mean,
    sdLengthCm: sd,
    biomassKgHa: biomass,
    interval: piOut,
    samplingRange,
    thresholdKgHa: threshold,
    meetsThreshold: meets,
    extrapolated,
    morePlantsSuggested: more,
    lengthForThresholdCm,
    level,
    note: parts.join(' '),
  };
}
