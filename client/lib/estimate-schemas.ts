import { z } from 'zod';

/**
 * The answers the live estimate needs, checked with zod. Loaded with their queries' first fetch
 * (lib/estimate-inputs.ts), not with the first screen. The Fit inside a calibration is checked by
 * the estimation core itself (assertFit) when it is used.
 */
export const calibrationItemSchema = z.looseObject({
  id: z.string(),
  crop: z.string(),
  variety: z.string().nullable().optional(),
  version: z.union([z.number(), z.string()]),
  model: z.string(),
  n: z.number().optional(),
  xRange: z.tuple([z.number(), z.number()]).optional(),
  fit: z.record(z.string(), z.unknown()),
  assigned: z.boolean().optional(),
});

export const calibrationsResponseSchema = z.object({ items: z.array(calibrationItemSchema), total: z.number() });

export const rulesSchema = z.looseObject({
  thresholdKgHa: z.number().positive(),
  minDaysInWindow: z.number().optional(),
  label: z.string().nullable().optional(),
});
