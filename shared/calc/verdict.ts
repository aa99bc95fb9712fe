import { combinedInterval, sampleStats, type CombinedInterval } from './combined';
import { CalcError } from './errors';
import type { Fit } from './fit-types';
import { lengthForBiomass } from './inverse';
import { sampleSizeForMean } from './power';
import { assertFit, predict } from './predict';
import { DECISION_BASES, type DecisionBasis } from './rules';
import { requireLevel, requirePositive } from './validate';

/*
 * The verdict of one field walk under a credit rule's declared decision basis. Everything returned
 * is numbers (SI) and codes; shared/format turns them into words in the reader's language and units.
 */

/**
 * - point: the point estimate ≥ threshold meets.
 * - lower_bound: the one-sided lower bound of the combined interval at the rule's confidence ≥
 *   threshold meets; a point estimate below the threshold is below; in between is borderline.
 * - point_with_borderline: the point estimate decides, but a two-sided combined interval at the
 *   rule's confidence that spans the threshold (or an unknown spread) makes it borderline.
 */
export type Verdict = 'meets' | 'below' | 'borderline';

/** The parts of a credit rule the verdict needs (thresholdKgHa in kg/ha). */
export interface VerdictRule {
  thresholdKgHa: number;
  decisionBasis: DecisionBasis;
  /** e.g. 0.9: two-sided coverage of the interval, one-sided coverage of the lower bound. */
  confidence: number;
  /** Fewer plants than this: at best borderline. */
  minPlants: number;
}

/** The demo rule's choice (a setting to agree with the local authority, not a constant of nature). */
export const DEMO_VERDICT_RULE = Object.freeze({ decisionBasis: 'point_with_borderline', confidence: 0.9, minPlants: 10 } as const);

export interface VerdictOptions {
  /** Power of the "measure more plants" advice. Default 0.8. */
  power?: number;
  /** Above this many plants in all, advise walking again later instead. Default 40. */
  maxPlants?: number;
}

/** Why: codes plus the SI numbers a sentence needs. `reasons` decided the verdict; `cautions` did not. */
export type VerdictReason =
  | { code: 'point_meets' | 'point_below'; biomassKgHa: number; thresholdKgHa: number }
  | { code: 'lower_bound_meets' | 'lower_bound_below'; lowerBoundKgHa: number; thresholdKgHa: number; confidence: number }
  | { code: 'interval_spans_threshold' | 'interval_above_threshold' | 'interval_below_threshold'; lowKgHa: number; highKgHa: number; thresholdKgHa: number; level: number }
  | { code: 'too_few_plants'; n: number; minPlants: number }
  | { code: 'unknown_spread'; n: number }
  | { code: 'extrapolated'; meanLengthCm: number; calibratedCm: [number, number] };

export type MorePlantsAdvice =
  /** About `more` plants (N = `total` in all) give a `power` chance of settling it. */
  | { kind: 'measure_more'; more: number; total: number; power: number; alpha: number; sided: 'one' | 'two' }
  /** Reach the rule's minimum first. */
  | { kind: 'reach_minimum'; more: number; minPlants: number }
  /** All lengths equal (or one plant): check the entries, measure a few more plants to learn the spread. */
  | { kind: 'spread_unknown'; more: number }
  /** More than `maxPlants` would be needed: walk again later, when the crop has grown. */
  | { kind: 'walk_again'; total: number | null; maxPlants: number; power: number }
  /** The calibration's own scatter spans the threshold: no number of plants settles it. */
  | { kind: 'calibration_spans_threshold' };

export interface VerdictResult {
  verdict: Verdict;
  decisionBasis: DecisionBasis;
  confidence: number;
  minPlants: number;
  thresholdKgHa: number;
  n: number;
  meanLengthCm: number;
  sdLengthCm: number | null;
  /** Point estimate (bias-corrected mean for the log models), kg/ha, floored at 0. */
  biomassKgHa: number;
  combined: CombinedInterval;
  /** Length at which the curve reaches the threshold (extrapolating if need be), or null. */
  lengthForThresholdCm: number | null;
  extrapolated: boolean;
  reasons: VerdictReason[];
  cautions: VerdictReason[];
  /** Advice when the verdict is borderline; null otherwise. */
  morePlants: MorePlantsAdvice | null;
}

function checkRule(rule: VerdictRule): VerdictRule {
  if (typeof rule !== 'object' || rule === null) throw new CalcError('bad_option', 'A credit rule is required.', 'rule');
  requirePositive(rule.thresholdKgHa, 'thresholdKgHa');
  if (!DECISION_BASES.includes(rule.decisionBasis)) {
    throw new CalcError('bad_option', 'The decision basis must be point, lower_bound or point_with_borderline.', 'decisionBasis');
  }
  requireLevel(rule.confidence, 'confidence');
  if (!Number.isInteger(rule.minPlants) || rule.minPlants < 1) {
    throw new CalcError('bad_option', 'The minimum number of plants must be a whole number of at least 1.', 'minPlants');
  }
  return rule;
}

/**
 * The verdict of a walk (main shoot lengths in cm) under a rule. Fewer than rule.minPlants plants is
 * at best borderline; an unknown spread (one plant, or all lengths equal) is never settled under
 * the interval-based bases.
 */
export function decideVerdict(fit: Fit, lengthsCm: readonly number[], rule: VerdictRule, options: VerdictOptions = {}): VerdictResult {
  assertFit(fit);
  const r = checkRule(rule);
  const power = requireLevel(options.power ?? 0.8, 'power');
  const maxPlants = options.maxPlants ?? 40;
  if (!Number.isInteger(maxPlants) || maxPlants < 2) throw new CalcError('bad_option', 'maxPlants must be a whole number of at least 2.', 'maxPlants');
  const s = sampleStats(lengthsCm);
  const T = r.thresholdKgHa;
  const point = Math.max(0, predict(fit, s.meanCm));
  const combined = combinedInterval(fit, s, { level: r.confidence });
  const inv = lengthForBiomass(fit, T, { extrapolate: true });
  const lengthForThresholdCm = inv.ok ? inv.x : null;
  const [x0, x1] = fit.xRange;
  const extrapolated = s.meanCm < x0 || s.meanCm > x1;

  const reasons: VerdictReason[] = [];
  const cautions: VerdictReason[] = [];
  const pointReason: VerdictReason = { code: point >= T ? 'point_meets' : 'point_below', biomassKgHa: point, thresholdKgHa: T };
  const iv = combined.interval;
  const intervalReason: VerdictReason | null = iv
    ? {
        code: iv[0] < T && T < iv[1] ? 'interval_spans_threshold' : iv[0] >= T ? 'interval_above_threshold' : 'interval_below_threshold',
        lowKgHa: iv[0],
        highKgHa: iv[1],
        thresholdKgHa: T,
        level: r.confidence,
      }
    : null;
  const unknown: VerdictReason = { code: 'unknown_spread', n: s.n };

  let verdict: Verdict;
  switch (r.decisionBasis) {
    case 'point':
      verdict = point >= T ? 'meets' : 'below';
      reasons.push(pointReason);
      if (intervalReason) cautions.push(intervalReason);
      else cautions.push(unknown);
      break;
    case 'point_with_borderline':
      reasons.push(pointReason);
      if (!intervalReason) {
        verdict = 'borderline';
        reasons.push(unknown);
      } else {
        reasons.push(intervalReason);
        verdict = intervalReason.code === 'interval_spans_threshold' ? 'borderline' : point >= T ? 'meets' : 'below';
      }
      break;
    case 'lower_bound': {
      const lb = combined.lowerBound;
      if (lb === null) {
        reasons.push(unknown);
        if (point < T) reasons.push(pointReason);
        verdict = point < T ? 'below' : 'borderline';
      } else if (lb >= T) {
        verdict = 'meets';
        reasons.push({ code: 'lower_bound_meets', lowerBoundKgHa: lb, thresholdKgHa: T, confidence: r.confidence });
      } else {
        reasons.push({ code: 'lower_bound_below', lowerBoundKgHa: lb, thresholdKgHa: T, confidence: r.confidence });
        if (point < T) reasons.push(pointReason);
        verdict = point < T ? 'below' : 'borderline';
      }
      break;
    }
  }
  if (s.n < r.minPlants) {
    reasons.unshift({ code: 'too_few_plants', n: s.n, minPlants: r.minPlants });
    if (verdict === 'meets') verdict = 'borderline';
  }
  if (extrapolated) cautions.push({ code: 'extrapolated', meanLengthCm: s.meanCm, calibratedCm: [x0, x1] });

  let morePlants: MorePlantsAdvice | null = null;
  if (verdict === 'borderline') {
    morePlants = advise(r, s, combined, lengthForThresholdCm, power, maxPlants);
  }

  return {
    verdict,
    decisionBasis: r.decisionBasis,
    confidence: r.confidence,
    minPlants: r.minPlants,
    thresholdKgHa: T,
    n: s.n,
    meanLengthCm: s.meanCm,
    sdLengthCm: s.sdCm,
    biomassKgHa: point,
    combined,
    lengthForThresholdCm,
    extrapolated,
    reasons,
    cautions,
    morePlants,
  };
}

/**
 * How many more plants, on the length scale: δ = |x̄ − threshold length|, σ = the plants' sd, and the
 * calibration's part carried to length units, (u_cal / |slope|)², as variance that plants cannot
 * reduce (shared/calc/power.ts).
 */
function advise(
  rule: VerdictRule,
  s: { n: number; meanCm: number; sdCm: number | null },
  c: CombinedInterval,
  lengthForThresholdCm: number | null,
  power: number,
  maxPlants: number,
): MorePlantsAdvice {
  const toMinimum = Math.max(0, rule.minPlants - s.n);
  if (!c.spreadKnown || s.sdCm === null) {
    return toMinimum > 0 ? { kind: 'reach_minimum', more: toMinimum, minPlants: rule.minPlants } : { kind: 'spread_unknown', more: Math.max(2 - s.n, 1) };
  }
  const alpha = 1 - rule.confidence;
  const sided = rule.decisionBasis === 'lower_bound' ? 'one' : 'two';
  const T = rule.thresholdKgHa;
  const calSpans = c.calibrationOnly[0] < T && T < c.calibrationOnly[1];
  if (lengthForThresholdCm === null || !(Math.abs(c.slopePerCm) > 0)) {
    return toMinimum > 0 ? { kind: 'reach_minimum', more: toMinimum, minPlants: rule.minPlants } : { kind: 'calibration_spans_threshold' };
  }
  const delta = Math.abs(s.meanCm - lengthForThresholdCm);
  const fixed = (c.uCalibration / Math.abs(c.slopePerCm)) ** 2;
  const size = delta > 0 ? sampleSizeForMean({ sd: s.sdCm, delta, alpha, power, sided, fixedVariance: fixed }) : { total: null };
  if (size.total === null) {
    if (calSpans || delta === 0) {
      return toMinimum > 0 ? { kind: 'reach_minimum', more: toMinimum, minPlants: rule.minPlants } : { kind: 'calibration_spans_threshold' };
    }
    return { kind: 'walk_again', total: null, maxPlants, power };
  }
  const total = Math.max(size.total, rule.minPlants, s.n + 1);
  if (toMinimum > 0 && total === rule.minPlants) return { kind: 'reach_minimum', more: toMinimum, minPlants: rule.minPlants };
  if (total > maxPlants) {
    return toMinimum > 0 ? { kind: 'reach_minimum', more: toMinimum, minPlants: rule.minPlants } : { kind: 'walk_again', total, maxPlants, power };
  }
  return { kind: 'measure_more', more: total - s.n, total, power, alpha, sided };
}

/** What a walk's stored estimate keeps of its verdict: plain JSON, SI, codes and numbers (no words). */
export interface VerdictSnapshot {
  verdict: Verdict;
  decisionBasis: DecisionBasis;
  confidence: number;
  minPlants: number;
  thresholdKgHa: number;
  /** Two-sided combined interval, kg/ha; null when the spread was unknown. */
  combinedInterval: [number, number] | null;
  /** One-sided lower bound at `confidence`, kg/ha; null when the spread was unknown. */
  lowerBoundKgHa: number | null;
  reasons: VerdictReason[];
  cautions: VerdictReason[];
  morePlants: MorePlantsAdvice | null;
}

export function verdictSnapshot(v: VerdictResult): VerdictSnapshot {
  return {
    verdict: v.verdict,
    decisionBasis: v.decisionBasis,
    confidence: v.confidence,
    minPlants: v.minPlants,
    thresholdKgHa: v.thresholdKgHa,
    combinedInterval: v.combined.interval,
    lowerBoundKgHa: v.combined.lowerBound,
    reasons: v.reasons,
    cautions: v.cautions,
    morePlants: v.morePlants,
  };
}
