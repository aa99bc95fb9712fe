import { z } from 'zod';
import { CROPS } from '../calc/rules';
import { checkedBoundarySchema } from '../registry/boundary';
import { isSeason, seasonMismatch } from '../registry/season';

import { isoDate } from './dates';
import { plainText } from './text';

export { isoDate };

const text = (max: number) => plainText(max);
const optionalText = (max: number, multiline = false) =>
  z.preprocess((v) => (typeof v === 'string' && v.trim() === '' ? null : v), plainText(max, { multiline }).nullable().optional());

/** The crop list's codes; a person is told to choose from the list, never shown the codes. */
export const cropSchema = z.enum(CROPS, { message: 'Choose a crop from the list.' });

const emails = z.preprocess(
  (v) => (typeof v === 'string' ? v.split(/[,;\s]+/).filter(Boolean) : v),
  z
    .array(z.email({ error: (iss) => `“${String(iss.input)}” is not an e-mail address. Write each like grower@example.org, separated by commas.` }))
    .max(10, 'Give at most 10 grower addresses.')
    .optional(),
);

export const ranchInputSchema = z.object({
  name: text(200).min(1, 'Give the ranch a name.'),
  code: optionalText(40),
  county: optionalText(100),
  notes: optionalText(2000, true),
  contactEmails: emails,
});
export type RanchInput = z.infer<typeof ranchInputSchema>;
export const ranchPatchSchema = ranchInputSchema.partial();

const areaHa = z
  .number({ message: 'Enter the area as a number.' })
  .finite()
  .positive('The area must be more than zero.')
  .max(100_000, 'That area is larger than any field.');

export const fieldInputSchema = z.object({
  ranchId: z.string().min(1, 'Choose a ranch.'),
  name: text(200).min(1, 'Give the field a name.'),
  areaHa,
  boundary: checkedBoundarySchema.nullable().optional(),
  notes: optionalText(2000, true),
});
export type FieldInput = z.infer<typeof fieldInputSchema>;
export const fieldPatchSchema = fieldInputSchema.partial();

export const seasonSchema = z
  .string()
  .refine(isSeason, 'Write the season as 2026-27.')
  // The same century as every date (./dates.ts): 0000-01 or 9999-00 is a typo, not a season.
  .refine((s) => !isSeason(s) || (s >= '2000-01' && s <= '2098-99'), 'Use a season between 2000-01 and 2098-99.');

const plantingShape = z.object({
  fieldId: z.string().min(1, 'Choose a field.'),
  season: seasonSchema,
  crop: cropSchema,
  variety: optionalText(200),
  seededOn: isoDate,
  seedingRateKgHa: z.number({ message: 'Enter the seeding rate as a number.' }).finite().positive('The seeding rate must be more than zero.').max(2000, 'That seeding rate is higher than any cover crop is sown.').nullable().optional(),
  plannedTerminationOn: isoDate.nullable().optional(),
  terminatedOn: isoDate.nullable().optional(),
  notes: optionalText(2000, true),
});

type PlantingDates = { season?: string; seededOn?: string; terminatedOn?: string | null; plannedTerminationOn?: string | null };
const datesInOrder = (v: PlantingDates, ctx: z.RefinementCtx) => {
  const mismatch = v.season && v.seededOn ? seasonMismatch(v.season, v.seededOn) : null;
  if (mismatch) ctx.addIssue({ code: 'custom', path: ['season'], message: mismatch });
  if (v.seededOn && v.terminatedOn && v.terminatedOn < v.seededOn) {
    ctx.addIssue({ code: 'custom', path: ['terminatedOn'], message: 'Termination cannot come before seeding.' });
  }
  if (v.seededOn && v.plannedTerminationOn && v.plannedTerminationOn < v.seededOn) {
    ctx.addIssue({ code: 'custom', path: ['plannedTerminationOn'], message: 'Planned termination cannot come before seeding.' });
  }
};

export const plantingInputSchema = plantingShape.superRefine(datesInOrder);
export type PlantingInput = z.infer<typeof plantingInputSchema>;
export const plantingPatchSchema = plantingShape.partial().superRefine(datesInOrder);

/** `?limit=&offset=` of every list (README, "API": limit default 50, max 500). */
export const pagingSchema = z.object({
  limit: z.coerce.number().int().min(1).max(500).default(50),
  offset: z.coerce.number().int().min(0).default(0),
});
