import { z } from 'zod';
import { CROPS, DECISION_BASES } from '../calc/rules';
import { isoDate } from './dates';

const monthDay = z
  .string()
  .regex(/^(0[1-9]|1[0-2])-(0[1-9]|[12]\d|3[01])$/, 'Write month and day as MM-DD, e.g. 10-01.')
  .refine((v) => {
    const [m, d] = v.split('-').map(Number);
    return d <= [31, 29, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31][m - 1];
  }, 'That day does not exist in that month.');

/** A new version of the organisation's credit rule (PUT /api/rules/current), SI units. */
export const creditRuleInputSchema = z.object({
  thresholdKgHa: z.number({ message: 'Enter the threshold as a number.' }).finite().positive('The threshold must be more than zero.').max(50_000),
  minDaysInWindow: z.number({ message: 'Enter a whole number of days.' }).int('Enter a whole number of days.').min(0).max(366),
  window: z.object({ start: monthDay, end: monthDay }),
  eligibleCrops: z.array(z.enum(CROPS)).min(1, 'Choose at least one eligible crop.'),
  creditKgNPerHa: z.number({ message: 'Enter the credit as a number.' }).finite().min(0, 'The credit cannot be negative.').max(1000),
  maxDaysSampleBeforeTermination: z.number({ message: 'Enter a whole number of days.' }).int('Enter a whole number of days.').min(0).max(366),
  /** How the verdict is decided (shared/calc/verdict.ts); point_with_borderline when not given. */
  decisionBasis: z.enum(DECISION_BASES, { message: 'Choose how the verdict is decided.' }).optional(),
  /** Confidence of the interval or bound the decision uses, as a fraction (0.9 = 90 %). */
  confidence: z
    .number({ message: 'Enter the confidence as a number, e.g. 0.9 for 90 %.' })
    .min(0.5, 'The confidence must be at least 50 %.')
    .max(0.995, 'The confidence must be at most 99.5 %.')
    .optional(),
  /** Fewer plants than this make a walk borderline at best. */
  minPlants: z.number({ message: 'Enter a whole number of plants.' }).int('Enter a whole number of plants.').min(1, 'At least 1 plant.').max(100, 'At most 100 plants.').optional(),
  /** The day this version starts to apply; today when not given. */
  effectiveFrom: isoDate.optional(),
  notes: z.string().trim().max(2000).nullable().optional(),
});
export type CreditRuleInput = z.infer<typeof creditRuleInputSchema>;
