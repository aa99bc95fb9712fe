import type { Knex } from 'knex';
import { decideVerdict, estimateBiomass } from '../../shared/calc/light';
import type { WalkEstimate } from '../../shared/schemas/walks';
import { assignedCalibrationFor } from '../calibrations/public';
import { currentCreditRule } from '../rules/public';

/**
 * The estimate snapshot of a walk: the calibration the organisation assigns to the planting's crop
 * (and variety), the credit rule version in effect, and the numbers of the estimation core: the
 * estimate, its intervals at the rule's confidence, and the verdict under the rule's decision basis
 * (shared/calc/verdict.ts) with its reason codes and advice. Stored once with the walk and never
 * recomputed, so later calibration or rule versions never change a past record. null when no
 * published calibration is assigned for the crop. Numbers (SI) and codes only: every screen words
 * them for its reader (shared/format).
 */
export async function estimateSnapshot(
  db: Knex,
  organisationId: string,
  planting: { crop: string; variety: string | null },
  lengthsCm: number[],
): Promise<WalkEstimate | null> {
  const calibration = await assignedCalibrationFor(db, organisationId, planting.crop, planting.variety);
  if (!calibration) return null;
  const rule = await currentCreditRule(db, organisationId);
  const level = rule.confidence;
  const e = estimateBiomass(calibration.fit, lengthsCm, { thresholdKgHa: rule.thresholdKgHa, level });
  const v = decideVerdict(calibration.fit, lengthsCm, {
    thresholdKgHa: rule.thresholdKgHa,
    decisionBasis: rule.decisionBasis,
    confidence: rule.confidence,
    minPlants: rule.minPlants,
  });
  // The older count assumed the observed spread is the truth; kept for older readers, but never
  // "settled" (0) unless the verdict is, and the stated-power advice is in `morePlants`.
  const more = v.morePlants;
  const morePlantsSuggested =
    v.verdict !== 'borderline' ? (v.combined.spreadKnown ? 0 : null) : more && 'more' in more ? more.more : null;
  return {
    calibrationId: calibration.id,
    calibrationVersion: calibration.version,
    n: e.n,
    meanLengthCm: e.meanLengthCm,
    sdLengthCm: v.sdLengthCm,
    biomassKgHa: e.biomassKgHa,
    interval: e.interval,
    samplingRange: e.samplingRange,
    level,
    thresholdKgHa: e.thresholdKgHa,
    meetsThreshold: e.meetsThreshold,
    extrapolated: e.extrapolated,
    morePlantsSuggested,
    verdict: v.verdict,
    decisionBasis: v.decisionBasis,
    confidence: v.confidence,
    minPlants: v.minPlants,
    ruleVersionId: rule.id,
    ruleVersion: rule.version,
    combinedInterval: v.combined.interval,
    lowerBoundKgHa: v.combined.lowerBound,
    verdictReasons: v.reasons,
    verdictCautions: v.cautions,
    morePlants: v.morePlants,
  };
}
