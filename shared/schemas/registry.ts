import { z } from 'zod';
import { CROPS } from '../calc/rules';
import { boundarySchema } from '../registry/boundary';
import { isSeason } from '../registry/season';

import { isoDate } from './dates';

export { isoDate };

const text = (max: number) => z.string().trim().max(max, `Use at most ${max} characters.`);
const optionalText = (max: number) =>
  z.preprocess((v) => (typeof v === 'string' && v.trim() === '' ? null : v), text(max).nullable().optional());

export const cropSchema = z.enum(CROPS, { message: `Choose one of: ${CROPS.join(', ')}.` });

const emails = z.preprocess(
  (v) => (typeof v === 'string' ? v.split(/[,;\s]+/).filter(Boolean) : v),
  z.array(z.email({ message: 'Each grower address must be an e-mail address.' })).max(10).optional(),
);

export const ranchInputSchema = z.object({
  name: text(200).min(1, 'Give the ranch a name.'),
  code: optionalText(40),
  county: optionalText(100),
  notes: optionalText(2000),
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
  boundary: boundarySchema.nullable().optional(),
  notes: optionalText(2000),
});
export type FieldInput = z.infer<typeof fieldInputSchema>;
export const fieldPatchSchema = fieldInputSchema.partial();

export const seasonSchema = z.string().refine(isSeason, 'Write the season as 2026-27.');

const plantingShape = z.object({
  fieldId: z.string().min(1, 'Choose a field.'),
  season: seasonSchema,
  crop: cropSchema,
  variety: optionalText(200),
  seededOn: isoDate,
  seedingRateKgHa: z.number().finite().positive('The seeding rate must be more than zero.').max(2000).nullable().optional(),
  plannedTerminationOn: isoDate.nullable().optional(),
  terminatedOn: isoDate.nullable().optional(),
  notes: optionalText(2000),
});

type PlantingDates = { seededOn?: string; terminatedOn?: string | null; plannedTerminationOn?: string | null };
const datesInOrder = (v: PlantingDates, ctx: z.RefinementCtx) => {
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

/** `?limit=&offset=` of every list (../shared/API.md: limit default 50, max 500). */
export const pagingSchema = z.object({
  limit: z.coerce.number().int().min(1).max(500).default(50),
  offset: z.coerce.number().int().min(0).default(0),
});
