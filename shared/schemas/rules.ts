import { z } from 'zod';
import { CROPS, DECISION_BASES, type DecisionBasis } from '../calc/rules';
import { isoDate } from './dates';
import { plainText } from './text';

const monthDay = z
  .string()
  .regex(/^(0[1-9]|1[0-2])-(0[1-9]|[12]\d|3[01])$/, 'Write month and day as MM-DD, e.g. 10-01.')
  .refine((v) => {
    const [m = 0, d = 0] = v.split('-').map(Number);
    const last = [31, 29, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31][m - 1];
    return last !== undefined && d <= last;
  }, 'That day does not exist in that month.');

/** A new version of the organisation's credit rule (PUT /api/rules/current), SI units. */
export const creditRuleInputSchema = z.object({
  thresholdKgHa: z.number({ message: 'Enter the threshold as a number.' }).finite().positive('The threshold must be more than zero.').max(50_000),
  minDaysInWindow: z.number({ message: 'Enter a whole number of days.' }).int('Enter a whole number of days.').min(0).max(366),
  window: z.object({ start: monthDay, end: monthDay }),
  eligibleCrops: z.array(z.enum(CROPS)).min(1, 'Choose at least one eligible crop.'),
  creditKgNPerHa: z.number({ message: 'Enter the credit as a number.' }).finite().min(0, 'The credit cannot be negative.').max(1000),
  maxDaysSampleBeforeTermination: z.number({ message: 'Enter a whole number of days.' }).int('Enter a whole number of days.').min(0).max(366),
  /** How the verdict is decided (shared/calc/verdict.ts); the version in effect's choice when not given. */
  decisionBasis: z.enum(DECISION_BASES, { message: 'Choose how the verdict is decided.' }).optional(),
  /** Confidence of the interval or bound the decision uses, as a fraction (0.9 = 90 %). */
  confidence: z
    .number({ message: 'Enter the confidence as a number, e.g. 0.9 for 90 %.' })
    .min(0.5, 'The confidence must be at least 50 %.')
    .max(0.995, 'The confidence must be at most 99.5 %.')
    .optional(),
  /** Fewer plants than this make a walk borderline at best. */
  minPlants: z.number({ message: 'Enter a whole number of plants.' }).int('Enter a whole number of plants.').min(1, 'At least 1 plant.').max(100, 'At most 100 plants.').optional(),
  /** Metres the walk plan keeps from every field edge (shared/calc/walk-plan.ts). */
  edgeMarginM: z
    .number({ message: 'Enter the edge margin as a number of metres.' })
    .finite()
    .min(0, 'The edge margin cannot be negative.')
    .max(100, 'The edge margin must be at most 100 m.')
    .optional(),
  /** The day this version starts to apply; today when not given. */
  effectiveFrom: isoDate.optional(),
  notes: plainText(2000, { multiline: true }).nullable().optional(),
});
export type CreditRuleInput = z.infer<typeof creditRuleInputSchema>;

/** How the rule judges a walk: stored with every rule version (defaults: shared/calc/verdict.ts DEMO_VERDICT_RULE). */
export interface RuleVerdictSettings {
  decisionBasis: DecisionBasis;
  confidence: number;
  minPlants: number;
  edgeMarginM: number;
}

/** GET /api/rules/current: the rule in effect today (SI units). `id`/`version` are null when no version was saved. */
export const creditRuleInEffectSchema = z.object({
  id: z.string().nullable(),
  version: z.number().nullable(),
  effectiveFrom: z.string().nullable(),
  isDemo: z.boolean(),
  label: z.string(),
  thresholdKgHa: z.number(),
  minDaysInWindow: z.number(),
  window: z.object({ start: z.string(), end: z.string() }),
  eligibleCrops: z.array(z.string()),
  creditKgNPerHa: z.number(),
  maxDaysSampleBeforeTermination: z.number(),
  decisionBasis: z.enum(DECISION_BASES),
  confidence: z.number(),
  minPlants: z.number(),
  edgeMarginM: z.number(),
});
export type CreditRuleInEffect = z.infer<typeof creditRuleInEffectSchema>;
