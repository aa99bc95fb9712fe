import { queryOptions } from '@tanstack/react-query';
import { z } from 'zod';
import { api } from './api';

/**
 * Published calibrations and the current credit rule, fetched while there is signal and kept on
 * the phone (query persistence) so the live estimate works offline. The Fit inside a calibration
 * is checked by the estimation core itself (assertFit) when it is used.
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
export type CalibrationItem = z.infer<typeof calibrationItemSchema>;

export const calibrationsResponseSchema = z.object({ items: z.array(calibrationItemSchema), total: z.number() });

export const rulesSchema = z.looseObject({
  thresholdKgHa: z.number().positive(),
  minDaysInWindow: z.number().optional(),
  label: z.string().nullable().optional(),
});
export type CurrentRules = z.infer<typeof rulesSchema>;

export const calibrationKeys = { all: ['calibrations'] as const };
export const rulesKeys = { all: ['rules'] as const, current: () => ['rules', 'current'] as const };

export const calibrationsQuery = queryOptions({
  queryKey: calibrationKeys.all,
  queryFn: ({ signal }) => api.get('/api/calibrations?limit=500', calibrationsResponseSchema, { signal }),
  staleTime: 10 * 60_000,
});

export const rulesQuery = queryOptions({
  queryKey: rulesKeys.current(),
  queryFn: ({ signal }) => api.get('/api/rules/current', rulesSchema, { signal }),
  staleTime: 10 * 60_000,
});
