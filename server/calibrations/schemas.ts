import { z } from 'zod';
import { MODELS } from '../../shared/calc';
import { BIOMASS_UNITS, LENGTH_UNITS } from './db';
import { MAX_BIOMASS_KG_HA, MAX_LENGTH_CM, MAX_POINTS, MIN_POINTS } from './import';

/* Request shapes of the calibration API and office forms (zod 4). Units on the wire are SI. */

const optionalText = (max: number) =>
  z
    .string({ message: 'Give text.' })
    .trim()
    .max(max, `Use at most ${max} characters.`)
    .nullish()
    .transform((v) => (v ? v : null));

export const modelSchema = z.enum(MODELS, { message: 'Choose one of: linear, power, exponential, quadratic.' });
export const cropSchema = z.string({ message: 'Choose a crop.' }).trim().min(1, 'Choose a crop.').max(32, 'Choose a crop from the crop list.');
export const labelSchema = z.string({ message: 'Name this version.' }).trim().min(1, 'Name this version.').max(200, 'Use at most 200 characters.');

const xySchema = z.object({
  x: z.number({ message: 'x (mean main shoot length, cm) must be a number.' }),
  y: z.number({ message: 'y (oven-dry shoot biomass, kg/ha) must be a number.' }),
});

export const fitBodySchema = z.object({
  points: z.array(xySchema, { message: 'Give points as a list of {x, y}.' }).min(1, 'Give at least one point.').max(MAX_POINTS, `At most ${MAX_POINTS} points.`),
  model: modelSchema,
});

export const compareBodySchema = fitBodySchema.pick({ points: true });

const pointSchema = z.object({
  x: z.number({ message: 'x must be a number (cm).' }).gt(0, 'x must be greater than 0 cm.').max(MAX_LENGTH_CM, `x must be at most ${MAX_LENGTH_CM} cm.`),
  y: z.number({ message: 'y must be a number (kg/ha).' }).min(0, 'y must not be negative.').max(MAX_BIOMASS_KG_HA, `y must be at most ${MAX_BIOMASS_KG_HA} kg/ha.`),
  site: optionalText(200).optional(),
  date: z.iso.date({ message: 'Write dates as YYYY-MM-DD.' }).nullish(),
  stage: optionalText(40).optional(),
  note: optionalText(500).optional(),
});

export const createBodySchema = z.object({
  crop: cropSchema,
  variety: optionalText(200).optional(),
  region: optionalText(200).optional(),
  name: z.string({ message: 'Name the data set.' }).trim().min(1, 'Name the data set.').max(200, 'Use at most 200 characters.'),
  points: z.array(pointSchema, { message: 'Give points as a list.' }).min(MIN_POINTS, `Give at least ${MIN_POINTS} points.`).max(MAX_POINTS, `At most ${MAX_POINTS} points.`),
  /** The units the points were measured in, kept for the record (the points themselves are SI). */
  lengthUnit: z.enum(LENGTH_UNITS).default('cm'),
  biomassUnit: z.enum(BIOMASS_UNITS).default('kg_ha'),
});

/** Only a draft's description and model can change; the points, fit and status never through here. */
export const patchBodySchema = z
  .strictObject(
    {
      variety: optionalText(200).optional(),
      region: optionalText(200).optional(),
      label: optionalText(200).optional(),
      model: modelSchema.optional(),
    },
    { message: 'Only variety, region, label and model of a draft can be changed.' },
  )
  .refine((v) => Object.keys(v).length > 0, { message: 'Nothing to change.' });

export const publishBodySchema = z.object({
  model: modelSchema,
  label: labelSchema,
  assign: z.boolean({ message: 'assign is true or false.' }).optional(),
});

export const assignmentBodySchema = z.object({
  crop: cropSchema,
  variety: optionalText(200).optional(),
  calibrationId: z.string({ message: 'Choose a calibration.' }).trim().min(1, 'Choose a calibration.').max(100, 'That is not an id.'),
});

export const assignmentQuerySchema = z.object({
  crop: cropSchema,
  variety: optionalText(200).optional(),
});

export const listQuerySchema = z.object({
  status: z.enum(['published', 'retired', 'draft', 'all'], { message: 'status is published, retired, draft or all.' }).default('published'),
  crop: cropSchema.optional(),
  limit: z.coerce.number({ message: 'limit is a number.' }).int('limit is a whole number.').min(1, 'limit is at least 1.').max(500, 'limit is at most 500.').default(50),
  offset: z.coerce.number({ message: 'offset is a number.' }).int('offset is a whole number.').min(0, 'offset is not negative.').default(0),
});

export const tableQuerySchema = z
  .object({
    unit: z.enum(['in', 'cm'], { message: 'unit is in or cm.' }).optional(),
    from: z.coerce.number({ message: 'from is a number.' }).gt(0, 'from must be greater than 0.').max(1000, 'from is too large.').optional(),
    to: z.coerce.number({ message: 'to is a number.' }).gt(0, 'to must be greater than 0.').max(1000, 'to is too large.').optional(),
  })
  .refine((q) => q.from === undefined || q.to === undefined || q.from <= q.to, { message: '"from" must not be greater than "to".', path: ['from'] });
