import { queryOptions } from '@tanstack/react-query';
import { api } from './api';
import type { Infer } from './check';
import type { calibrationItemSchema, rulesSchema } from './estimate-schemas';

/**
 * Published calibrations and the current credit rule, fetched while there is signal and kept on
 * the phone (query persistence) so the live estimate works offline. Today's screen asks for them
 * after it has drawn; their checks (estimate-schemas.ts, without zod) load with that first fetch,
 * so they are not part of the first screen's code and zod is not part of the first visit.
 */
export type CalibrationItem = Infer<typeof calibrationItemSchema>;
export type CurrentRules = Infer<typeof rulesSchema>;

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
