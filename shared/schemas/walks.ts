import { z } from 'zod';
import { plainText } from './text';
import { boundarySchema } from '../registry/boundary';
import { isoDate } from './dates';

/**
 * Field walks on the wire (../shared/API.md, Field walks): what the capture app sends and what
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
  planSeed: z.string().min(1).max(64).optional(),
});
export type WalkCreate = z.infer<typeof walkCreateSchema>;

export const walkRejectSchema = z.object({ reason: plainText(1000, { multiline: true }).pipe(z.string().min(1, 'Say why the walk is rejected.')) });

/** The estimate snapshot stored with a walk: later calibration versions never change it. */
export const walkEstimateSchema = z.object({
  calibrationId: z.string(),
  calibrationVersion: z.union([z.number(), z.string()]),
  n: z.number(),
  meanLengthCm: z.number(),
  biomassKgHa: z.number(),
  interval: z.tuple([z.number(), z.number()]),
  samplingRange: z.tuple([z.number(), z.number()]).nullable(),
  level: z.number(),
  thresholdKgHa: z.number(),
  meetsThreshold: z.boolean(),
  extrapolated: z.boolean(),
  morePlantsSuggested: z.number().nullable(),
  note: z.string(),
});
export type WalkEstimate = z.infer<typeof walkEstimateSchema>;

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
