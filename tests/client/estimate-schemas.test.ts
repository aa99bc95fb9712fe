import { describe, expect, it } from 'vitest';
import { z } from 'zod';
import { calibrationsResponseSchema, rulesSchema } from '../../client/lib/estimate-schemas';

// The live estimate's answers are checked without zod (client/lib/estimate-schemas.ts), so that a
// first visit, which fetches them, does not bring zod. The reference is the zod schemas those
// checks replace, written here as they were: on every answer below both must agree (accept or
// refuse), and an accepted answer must come out the same (unknown keys kept where zod keeps them).

const referenceItem = z.looseObject({
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
const referenceCalibrations = z.object({ items: z.array(referenceItem), total: z.number() });
const referenceRules = z.looseObject({
  thresholdKgHa: z.number().positive(),
  minDaysInWindow: z.number().optional(),
  label: z.string().nullable().optional(),
  id: z.string().nullable().optional(),
  version: z.number().nullable().optional(),
  decisionBasis: z.string().nullable().optional(),
  confidence: z.number().nullable().optional(),
  minPlants: z.number().nullable().optional(),
  edgeMarginM: z.number().nullable().optional(),
});

// Invented calibration: a linear fit of biomass on shoot length.
const item = {
  id: 'c1',
  crop: 'cereal_rye',
  variety: 'Elbon',
  version: 3,
  model: 'linear',
  n: 24,
  xRange: [12, 61],
  fit: { model: 'linear', coefficients: [-310.5, 52.25], sigma: 140 },
  assigned: true,
  publishedAt: '2026-10-01T00:00:00Z',
};
const calibrations = { items: [item], total: 1 };
const withItem = (patch: object) => ({ ...calibrations, items: [{ ...item, ...patch }] });
const rules = { thresholdKgHa: 1500, minDaysInWindow: 60, label: 'Demo rule', id: 'r1', version: 2, decisionBasis: 'lower', confidence: 0.9, minPlants: 8, edgeMarginM: 10, effectiveFrom: '2026-07-01' };
const withRules = (patch: object) => ({ ...rules, ...patch });

type Case = [string, unknown];

const calibrationCases: Case[] = [
  ['the list as sent (an unknown key kept)', calibrations],
  ['an empty list', { items: [], total: 0 }],
  ['an extra key at the top (dropped)', { ...calibrations, next: 'x' }],
  ['the version as text', withItem({ version: '3b' })],
  ['the version as a flag', withItem({ version: true })],
  ['no variety', withItem({ variety: undefined })],
  ['a null variety', withItem({ variety: null })],
  ['a numeric variety', withItem({ variety: 7 })],
  ['no n', withItem({ n: undefined })],
  ['n as text', withItem({ n: '24' })],
  ['an infinite n', withItem({ n: Infinity })],
  ['no range', withItem({ xRange: undefined })],
  ['a range of three', withItem({ xRange: [1, 2, 3] })],
  ['a range of one', withItem({ xRange: [1] })],
  ['a range with text', withItem({ xRange: [1, '2'] })],
  ['a null range', withItem({ xRange: null })],
  ['a fit that is a list', withItem({ fit: [1, 2] })],
  ['a null fit', withItem({ fit: null })],
  ['an empty fit', withItem({ fit: {} })],
  ['no fit', withItem({ fit: undefined })],
  ['assigned as text', withItem({ assigned: 'yes' })],
  ['no id', withItem({ id: undefined })],
  ['no model', withItem({ model: undefined })],
  ['no total', { items: [item] }],
  ['items not a list', { items: item, total: 1 }],
  ['null', null],
];

const ruleCases: Case[] = [
  ['the rule as sent (an unknown key kept)', rules],
  ['the threshold only', { thresholdKgHa: 1500 }],
  ['a zero threshold', withRules({ thresholdKgHa: 0 })],
  ['a negative threshold', withRules({ thresholdKgHa: -5 })],
  ['the threshold as text', withRules({ thresholdKgHa: '1500' })],
  ['no threshold', withRules({ thresholdKgHa: undefined })],
  ['nulls where allowed', withRules({ label: null, id: null, version: null, decisionBasis: null, confidence: null, minPlants: null, edgeMarginM: null })],
  ['a null window', withRules({ minDaysInWindow: null })],
  ['a numeric label', withRules({ label: 5 })],
  ['a version as text', withRules({ version: '2' })],
  ['a confidence as text', withRules({ confidence: '0.9' })],
  ['a list', [rules]],
];

describe.each([
  ['GET /api/calibrations', calibrationsResponseSchema, referenceCalibrations, calibrationCases],
  ['GET /api/rules/current', rulesSchema, referenceRules, ruleCases],
] as const)('%s: the light check agrees with the zod schema it replaces', (_name, light, reference, cases) => {
  it.each(cases)('%s', (_label, answer) => {
    const expected = reference.safeParse(answer);
    const got = light.safeParse(answer);
    expect(got.success).toBe(expected.success);
    if (expected.success && got.success) expect(got.data).toEqual(expected.data);
  });

  it('the cases are not all alike: some are refused', () => {
    expect(cases.filter(([, a]) => !reference.safeParse(a).success).length).toBeGreaterThan(3);
  });
});
