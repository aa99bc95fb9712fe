import { z } from 'zod';
import { plainText } from './text';
import { DECISION_BASES } from '../calc/rules';
import type { MorePlantsAdvice, VerdictReason } from '../calc/verdict';
import { boundarySchema } from '../registry/boundary';
import { isoDate } from './dates';

/**
 * Field walks on the wire (README, "Field walks API"): what the capture app sends and what
 * the server answers. SI units: lengths in cm, biomass in kg/ha, areas in ha.
 */
export const MAX_PLANTS = 100;
/** Longer than any cereal main shoot; entries above are refused, not just questioned. */
export const MAX_LENGTH_CM = 300;

export const walkStatusSchema = z.enum(['draft', 'submitted', 'approved', 'rejected']);
export type WalkStatus = z.infer<typeof walkStatusSchema>;

export const walkPlantSchema = z.object({
  stop: z.number().int().min(1).max(MAX_PLANTS),
  lengthCm: z
    .number({ message: 'Enter the length as a number.' })
    .finite()
    .positive('A main shoot length must be more than zero.')
    .max(MAX_LENGTH_CM, `A main shoot length above ${MAX_LENGTH_CM} cm is not plausible.`),
  lat: z.number().min(-90).max(90).nullable().optional(),
  lon: z.number().min(-180).max(180).nullable().optional(),
});
export type WalkPlant = z.infer<typeof walkPlantSchema>;

export const walkCreateSchema = z.object({
  id: z.uuid({ message: 'The walk id must be a UUID made by the client.' }),
  plantingId: z.string().min(1, 'Choose the planting walked.'),
  walkedOn: isoDate,
  /** Growth stage as the sampler wrote it, e.g. "Z31" (Zadoks) or "F6" (Feekes). */
  stage: plainText(20).nullable().optional(),
  notes: plainText(2000, { multiline: true }).nullable().optional(),
  plants: z
    .array(walkPlantSchema)
    .min(1, 'Measure at least one plant.')
    .max(MAX_PLANTS)
    .refine((plants) => new Set(plants.map((p) => p.stop)).size === plants.length, 'Each stop appears once.'),
  /** Stops the sampler chose to skip (no plant measured there); optional, older phones leave it out. */
  skippedStops: z.array(z.number().int().min(1).max(MAX_PLANTS)).max(MAX_PLANTS).optional(),
  /** The seed the walk plan drew its stops from (shared/calc/walk-plan.ts), so the office can redraw them. */
  planSeed: z.string({ message: 'The plan seed must be a text.' }).min(1, 'The plan seed must be 1 to 64 characters.').max(64, 'The plan seed must be 1 to 64 characters.').optional(),
  /** How many stops the plan had (the phone's stop count; a stop added during the walk counts). */
  planStops: z.number({ message: 'The planned stop count must be a whole number.' }).int('The planned stop count must be a whole number.').min(1, `The planned stop count must be 1 to ${MAX_PLANTS}.`).max(MAX_PLANTS, `The planned stop count must be 1 to ${MAX_PLANTS}.`).optional(),
});
export type WalkCreate = z.infer<typeof walkCreateSchema>;

export const walkRejectSchema = z.object({ reason: plainText(1000, { multiline: true }).pipe(z.string().min(1, 'Say why the walk is rejected.')) });

/** A verdict reason or caution as stored: a code and the SI numbers its words need (shared/calc/verdict.ts). */
const verdictReasonSchema = z.custom<VerdictReason>((v) => typeof v === 'object' && v !== null && typeof (v as { code?: unknown }).code === 'string');
const morePlantsSchema = z.custom<MorePlantsAdvice>((v) => typeof v === 'object' && v !== null && typeof (v as { kind?: unknown }).kind === 'string');

/**
 * The estimate snapshot stored with a walk: later calibration or rule versions never change it.
 * Numbers and codes only; screens word them in the reader's units (shared/format). Snapshots stored
 * before decision bases existed have no `verdict` in storage: they are read with `verdict` from
 * `meetsThreshold`, basis `point` and `judgedBeforeDecisionBases: true`, and keep their stored
 * English `note` (new snapshots store no words).
 */
export const walkEstimateSchema = z.object({
  calibrationId: z.string(),
  calibrationVersion: z.union([z.number(), z.string()]),
  n: z.number(),
  meanLengthCm: z.number(),
  biomassKgHa: z.number(),
  /** Single-plot prediction interval at the mean length, at `level`. */
  interval: z.tuple([z.number(), z.number()]),
  samplingRange: z.tuple([z.number(), z.number()]).nullable(),
  level: z.number(),
  thresholdKgHa: z.number(),
  /** The point estimate at or above the threshold (unrounded), whatever the decision basis. */
  meetsThreshold: z.boolean(),
  extrapolated: z.boolean(),
  morePlantsSuggested: z.number().nullable(),
  /** Stored words of snapshots made before decision bases (US customary units); absent on new ones. */
  note: z.string().optional(),
  /** Always present in answers (old snapshots are read as said above); optional for what is stored. */
  verdict: z.enum(['meets', 'below', 'borderline']).optional(),
  decisionBasis: z.enum(DECISION_BASES).optional(),
  /** True for a snapshot stored before decision bases: its verdict is the point estimate's. */
  judgedBeforeDecisionBases: z.boolean().optional(),
  /** What decided the verdict, and what did not (cautions); absent on old snapshots. */
  verdictReasons: z.array(verdictReasonSchema).optional(),
  verdictCautions: z.array(verdictReasonSchema).optional(),
  /** The rule's confidence (two-sided interval, one-sided bound). */
  confidence: z.number().optional(),
  minPlants: z.number().optional(),
  /** The credit rule version the walk was judged by (null: no version saved, typical values used). */
  ruleVersionId: z.string().nullable().optional(),
  ruleVersion: z.number().nullable().optional(),
  /** Calibration and sampling uncertainty combined (README, "Verdicts"), kg/ha; null when the spread between plants is unknown. */
  combinedInterval: z.tuple([z.number(), z.number()]).nullable().optional(),
  lowerBoundKgHa: z.number().nullable().optional(),
  /** Sample standard deviation of the lengths, cm; null with one plant. */
  sdLengthCm: z.number().nullable().optional(),
  /** Advice when borderline (measure_more with its power, reach_minimum, spread_unknown, walk_again, calibration_spans_threshold). */
  morePlants: morePlantsSchema.nullable().optional(),
});
export type WalkEstimate = z.infer<typeof walkEstimateSchema>;

/** A snapshot with its verdict, as every answer carries it. */
export type JudgedWalkEstimate = WalkEstimate & Required<Pick<WalkEstimate, 'verdict' | 'decisionBasis'>>;

/** A stored snapshot as read: one stored before decision bases gets the point estimate's verdict, labelled so. */
export function readWalkEstimate(stored: WalkEstimate): JudgedWalkEstimate {
  if (stored.verdict && stored.decisionBasis) return stored as JudgedWalkEstimate;
  return { ...stored, verdict: stored.meetsThreshold ? 'meets' : 'below', decisionBasis: 'point', judgedBeforeDecisionBases: true };
}

export const walkPhotoSchema = z.object({
  id: z.string(),
  stop: z.number().int(),
  url: z.string(),
  contentType: z.string(),
  size: z.number(),
});

export const walkSchema = z.object({
  id: z.string(),
  plantingId: z.string(),
  fieldId: z.string(),
  fieldName: z.string(),
  ranchName: z.string(),
  crop: z.string(),
  variety: z.string().nullable(),
  walkedOn: z.string(),
  stage: z.string().nullable(),
  notes: z.string().nullable(),
  status: walkStatusSchema,
  rejectReason: z.string().nullable(),
  sampler: z.object({ id: z.string(), name: z.string() }),
  plants: z.array(walkPlantSchema),
  photos: z.array(walkPhotoSchema),
  /** Stops the sampler chose to skip, ascending; empty when none. */
  skippedStops: z.array(z.number().int()).optional(),
  /**
   * The plan the stops were drawn from (shared/calc/walk-plan.ts): its seed, its stop count and the
   * credit rule's edge margin when the walk was stored; null for walks sent without a seed.
   */
  plan: z.object({ seed: z.string(), stops: z.number().int(), edgeMarginM: z.number() }).nullable().optional(),
  /** null when no published calibration is assigned for the planting's crop. */
  estimate: walkEstimateSchema.nullable(),
  createdAt: z.string(),
  submittedAt: z.string().nullable(),
  reviewedAt: z.string().nullable(),
  reviewedBy: z.object({ id: z.string(), name: z.string() }).nullable(),
  /** An admin let the walker review this walk themselves (nobody approves their own walk otherwise). */
  ownReviewWaiver: z.object({ by: z.object({ id: z.string(), name: z.string() }), at: z.string(), reason: z.string() }).nullable().optional(),
});
/** POST /api/walks/:id/own-review-waiver: why the walker may review this walk themselves. */
export const ownReviewWaiverSchema = z.object({
  reason: z.string({ message: 'Say why this walk may be reviewed by the person who walked it.' }).trim().min(10, 'Say why in a sentence (at least 10 characters).').max(500, 'Keep the reason under 500 characters.'),
});

export type Walk = z.infer<typeof walkSchema>;

/** One planting on the sampler's "today" list (GET /api/today). */
export const todayItemSchema = z.object({
  plantingId: z.string(),
  fieldId: z.string(),
  fieldName: z.string(),
  ranchId: z.string(),
  ranchName: z.string(),
  areaHa: z.number(),
  boundary: boundarySchema.nullable(),
  season: z.string(),
  crop: z.string(),
  variety: z.string().nullable(),
  seededOn: z.string(),
  plannedTerminationOn: z.string().nullable(),
  daysSinceSeeding: z.number(),
  /** True when a clerk assigned this planting to the signed-in sampler. */
  assigned: z.boolean(),
  /** The calibration the estimate will use (the organisation's assignment for the crop), if any. */
  calibrationId: z.string().nullable(),
  /** The latest walk of this planting by anyone, if any. */
  latestWalk: z.object({ id: z.string(), status: walkStatusSchema, walkedOn: z.string(), rejectReason: z.string().nullable() }).nullable(),
});
export type TodayItem = z.infer<typeof todayItemSchema>;

export const todayResponseSchema = z.object({ items: z.array(todayItemSchema), total: z.number() });

/** PUT /api/walks/:id/tissue-n: the lab's tissue N % of the walk's shoots, or null to clear it. */
const TISSUE_N_MESSAGE = 'Enter the lab’s tissue nitrogen as a percentage above 0 and at most 10, for example 2.4.';
export const tissueNSchema = z.object({
  percent: z
    .union([z.number({ message: TISSUE_N_MESSAGE }), z.null()], { message: TISSUE_N_MESSAGE })
    .refine((v) => v === null || (Number.isFinite(v) && v > 0 && v <= 10), { message: TISSUE_N_MESSAGE }),
});
export type TissueNInput = z.infer<typeof tissueNSchema>;
