import { CalcError } from './errors';
import { daysInWindow, parseIsoDate, parseWindow } from './dates';
import { formatNumber } from '../format/figures';
import type { CreditRule } from './rules';
import { requireFinite, requireNonNegative, requirePositive } from './validate';

export interface PlantingInput {
  crop: string;
  seededOn: string;
  terminatedOn?: string | null;
  areaHa: number;
}

export interface WalkEstimateInput {
  biomassKgHa: number;
  /** Informational: the verdict is recomputed against this rule's threshold. */
  meetsThreshold?: boolean;
  walkedOn: string;
}

export type EligibilityReasonCode =
  | 'crop_not_eligible'
  | 'no_end_date'
  | 'too_few_days_in_window'
  | 'no_estimate'
  | 'below_threshold'
  | 'sample_after_termination'
  | 'sample_too_early';

/** The numbers and dates behind a reason (SI, ISO dates), so any screen can word it in its reader's units. */
export interface EligibilityReasonData {
  crop?: string;
  eligibleCrops?: string[];
  days?: number;
  minDays?: number;
  /** Counted up to the rule's `today` rather than a termination date. */
  projected?: boolean;
  endOn?: string;
  walkedOn?: string;
  biomassKgHa?: number;
  thresholdKgHa?: number;
  gapDays?: number;
  maxGapDays?: number;
}

export interface EligibilityReason {
  code: EligibilityReasonCode;
  /** English, SI units: kept for existing callers; shared/format's eligibilityReasonText words it for a reader. */
  message: string;
  data?: EligibilityReasonData;
}

export interface EligibilityResult {
  eligible: boolean;
  /** One per failed condition; empty when eligible. */
  reasons: EligibilityReason[];
  /** null only when there is neither a termination date nor a `today` to project to. */
  daysInWindow: number | null;
  /** True when computed up to rule.today because the planting has no termination date. */
  projected: boolean;
  /** The day growth was counted up to (termination, or today), or null. */
  endOn: string | null;
  creditKgN: number;
}

/**
 * Whether a planting earns the nitrogen scavenging credit under a rule. Every condition is checked
 * (not just the first failure) so the clerk sees all that is missing at once. Without a termination
 * date, rule.today stands in for it and the result is marked `projected` ("if terminated today").
 */
export function creditEligibility(
  planting: PlantingInput,
  walkEstimate: WalkEstimateInput | null,
  rule: CreditRule,
): EligibilityResult {
  if (typeof planting !== 'object' || planting === null) {
    throw new CalcError('bad_option', 'A planting is required.', 'planting');
  }
  if (typeof rule !== 'object' || rule === null) throw new CalcError('bad_option', 'A credit rule is required.', 'rule');
  const seeded = parseIsoDate(planting.seededOn, 'seededOn');
  const area = requirePositive(planting.areaHa, 'areaHa');
  const threshold = requirePositive(rule.thresholdKgHa, 'thresholdKgHa');
  const minDays = requireNonNegative(rule.minDaysInWindow, 'minDaysInWindow');
  const maxGap = requireNonNegative(rule.maxDaysSampleBeforeTermination, 'maxDaysSampleBeforeTermination');
  const creditPerHa = requireNonNegative(rule.creditKgNPerHa, 'creditKgNPerHa');
  parseWindow(rule.window);
  if (!Array.isArray(rule.eligibleCrops)) throw new CalcError('bad_option', 'eligibleCrops must be a list.', 'eligibleCrops');

  const terminated = planting.terminatedOn ? parseIsoDate(planting.terminatedOn, 'terminatedOn') : null;
  const today = !terminated && rule.today ? parseIsoDate(rule.today, 'today') : null;
  const end = terminated ?? today;
  const endOn = terminated ? (planting.terminatedOn as string) : today ? (rule.today as string) : null;
  const projected = !terminated && today !== null;
  if (end && end.day < seeded.day) {
    throw new CalcError(
      'dates_out_of_order',
      `The ${terminated ? 'termination' : "projection ('today')"} date ${endOn} is before the seeding date ${planting.seededOn}.`,
      terminated ? 'terminatedOn' : 'today',
    );
  }

  const reasons: EligibilityReason[] = [];
  if (!rule.eligibleCrops.includes(planting.crop)) {
    reasons.push({
      code: 'crop_not_eligible',
      message: `The crop class "${planting.crop}" is not eligible under this rule (eligible: ${rule.eligibleCrops.join(', ') || 'none'}).`,
      data: { crop: planting.crop, eligibleCrops: [...rule.eligibleCrops] },
    });
  }

  let days: number | null = null;
  if (!end) {
    reasons.push({ code: 'no_end_date', message: 'No termination date yet, so days in the rainy window cannot be counted.' });
  } else {
    days = daysInWindow(planting.seededOn, endOn as string, rule.window);
    if (days < minDays) {
      reasons.push({
        code: 'too_few_days_in_window',
        message: projected
          ? `As of ${endOn} the crop has grown ${days} days inside the rainy window; the rule needs ${minDays}.`
          : `The crop grew ${days} days inside the rainy window; the rule needs ${minDays}.`,
        data: { days, minDays, projected, endOn: endOn as string },
      });
    }
  }

  if (walkEstimate === null || walkEstimate === undefined) {
    reasons.push({ code: 'no_estimate', message: 'No biomass estimate yet: a field walk is needed.' });
  } else {
    const biomass = requireFinite(walkEstimate.biomassKgHa, 'biomassKgHa');
    const walked = parseIsoDate(walkEstimate.walkedOn, 'walkedOn');
    if (walked.day < seeded.day) {
      throw new CalcError('dates_out_of_order', `The walk date ${walkEstimate.walkedOn} is before the seeding date.`, 'walkedOn');
    }
    if (!(biomass >= threshold)) {
      reasons.push({
        code: 'below_threshold',
        message: `The estimated biomass, ${formatNumber(biomass)} kg/ha, is below the ${formatNumber(threshold)} kg/ha threshold.`,
        data: { biomassKgHa: biomass, thresholdKgHa: threshold },
      });
    }
    if (end) {
      const gap = end.day - walked.day;
      if (gap < 0) {
        reasons.push({
          code: 'sample_after_termination',
          message: projected
            ? `The walk date ${walkEstimate.walkedOn} is after the projection date ${endOn}.`
            : `The sample was taken on ${walkEstimate.walkedOn}, after termination on ${endOn}.`,
          data: { walkedOn: walkEstimate.walkedOn, endOn: endOn as string, projected },
        });
      } else if (gap > maxGap) {
        reasons.push({
          code: 'sample_too_early',
          message: `The sample was taken ${gap} days before ${projected ? 'the projection date' : 'termination'}; the rule allows at most ${maxGap}.`,
          data: { gapDays: gap, maxGapDays: maxGap, projected, endOn: endOn as string },
        });
      }
    }
  }

  const eligible = reasons.length === 0;
  return {
    eligible,
    reasons,
    daysInWindow: days,
    projected,
    endOn,
    creditKgN: eligible ? creditPerHa * area : 0,
  };
}
