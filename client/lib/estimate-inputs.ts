import { queryOptions } from '@tanstack/react-query';
import type { z } from 'zod';
import { api } from './api';
import type { calibrationItemSchema, rulesSchema } from './estimate-schemas';

/**
 * Published calibrations and the current credit rule, fetched while there is signal and kept on
 * the phone (query persistence) so the live estimate works offline. Today's screen asks for them
 * after it has drawn; their zod schemas (estimate-schemas.ts) load with that first fetch, so zod
 * is not part of the first screen's code (the service worker precaches it for offline use).
 */
export type CalibrationItem = z.infer<typeof calibrationItemSchema>;
export type CurrentRules = z.infer<typeof rulesSchema>;

const schemas = () => import('./estimate-schemas');

export const calibrationKeys = { all: ['calibrations'] as const };
export const rulesKeys = { all: ['rules'] as const, current: () => ['rules', 'current'] as const };

export const calibrationsQuery = queryOptions({
  queryKey: calibrationKeys.all,
  queryFn: async ({ signal }) => api.get('/api/calibrations?limit=500', (await schemas()).calibrationsResponseSchema, { signal }),
  staleTime: 10 * 60_000,
});

export const rulesQuery = queryOptions({
  queryKey: rulesKeys.current(),
  queryFn: async ({ signal }) => api.get('/api/rules/current', (await schemas()).rulesSchema, { signal }),
  staleTime: 10 * 60_000,
});
