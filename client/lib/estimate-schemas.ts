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
  // How the verdict is decided and where stops may go (client/lib/rule-settings.ts fills in the
  // demo values while a server leaves them out). Loose here so an odd value never blanks the rule.
  id: z.string().nullable().optional(),
  version: z.number().nullable().optional(),
  decisionBasis: z.string().nullable().optional(),
  confidence: z.number().nullable().optional(),
  minPlants: z.number().nullable().optional(),
  edgeMarginM: z.number().nullable().optional(),
});
