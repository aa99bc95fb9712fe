import type { SeasonWindow } from './dates';
import { lbPerAcToKgPerHa } from './units';

/** Cover-crop classes a planting can be recorded as. */
export const CROPS = ['cereal_rye', 'triticale', 'barley', 'oats', 'wheat', 'legume', 'mix', 'other'] as const;
export type CropClass = (typeof CROPS)[number];

/** The winter cereals (non-legume scavengers) a typical rule makes eligible. */
export const CEREAL_CROPS = ['cereal_rye', 'triticale', 'barley', 'oats', 'wheat'] as const satisfies readonly CropClass[];

/** How a rule turns an estimate into a verdict; explained in shared/calc/verdict.ts. */
export const DECISION_BASES = ['point', 'lower_bound', 'point_with_borderline'] as const;
export type DecisionBasis = (typeof DECISION_BASES)[number];

export interface CreditRule {
  thresholdKgHa: number;
  minDaysInWindow: number;
  window: SeasonWindow;
  eligibleCrops: string[];
  creditKgNPerHa: number;
  maxDaysSampleBeforeTermination: number;
  /** 'YYYY-MM-DD': project to this day when the planting has no termination date yet. */
  today?: string;
}

/**
 * Typical rule values, for demos and tests only. Real rules are settings an administrator confirms
 * against the local authority, never constants in code.
 * - 4,500 lb/ac and 90 days: the typical values of such rules (product brief); 4,500 lb/ac is
 *   exactly 5,043.83 kg/ha.
 * - window 10-01..03-31: an invented demo choice of rainy period.
 * - 50 lb N/ac credit (56.04 kg N/ha) and 30 days sample-to-termination: invented demo values.
 */
export const DEMO_RULE: Readonly<CreditRule> = Object.freeze({
  thresholdKgHa: lbPerAcToKgPerHa(4500),
  minDaysInWindow: 90,
  window: Object.freeze({ start: '10-01', end: '03-31' }),
  eligibleCrops: [...CEREAL_CROPS],
  creditKgNPerHa: lbPerAcToKgPerHa(50),
  maxDaysSampleBeforeTermination: 30,
});
