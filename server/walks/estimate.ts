import type { Knex } from 'knex';
import { estimateBiomass } from '../../shared/calc/light';
import type { WalkEstimate } from '../../shared/schemas/walks';
import { assignedCalibrationFor } from '../calibrations/public';
import { currentCreditRule } from '../rules/public';

/** Level of the prediction interval and sampling range stored with every walk. */
export const ESTIMATE_LEVEL = 0.9;

/**
 * The estimate snapshot of a walk: the calibration the organisation assigns to the planting's crop
 * (and variety), the credit rule's threshold in effect, and the numbers of the estimation core.
 * Stored once with the walk and never recomputed, so later calibration or rule versions never
 * change a past record. null when no published calibration is assigned for the crop.
 * The plain-words note is in US customary units, as the trade reads it; the numbers are SI.
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
  const e = estimateBiomass(calibration.fit, lengthsCm, { thresholdKgHa: rule.thresholdKgHa, level: ESTIMATE_LEVEL });
  return {
    calibrationId: calibration.id,
    calibrationVersion: calibration.version,
    n: e.n,
    meanLengthCm: e.meanLengthCm,
    biomassKgHa: e.biomassKgHa,
    interval: e.interval,
    samplingRange: e.samplingRange,
    level: e.level,
    thresholdKgHa: e.thresholdKgHa,
    meetsThreshold: e.meetsThreshold,
    extrapolated: e.extrapolated,
    morePlantsSuggested: e.morePlantsSuggested,
    note: e.note,
  };
}
