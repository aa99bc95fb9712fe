import { describe, expect, it } from 'vitest';
import { creditRuleInputSchema } from '../../shared/schemas/rules';

const base = {
  thresholdKgHa: 5043.83, minDaysInWindow: 90, window: { start: '10-01', end: '03-31' },
  eligibleCrops: ['cereal_rye'], creditKgNPerHa: 56.04, maxDaysSampleBeforeTermination: 30,
};

describe('credit rule input: the decision basis fields', () => {
  it('are optional (older clients keep working) and accept the three bases', () => {
    expect(creditRuleInputSchema.safeParse(base).success).toBe(true);
    for (const decisionBasis of ['point', 'lower_bound', 'point_with_borderline']) {
      expect(creditRuleInputSchema.safeParse({ ...base, decisionBasis, confidence: 0.9, minPlants: 10 }).success).toBe(true);
    }
  });

  it.each([
    [{ decisionBasis: 'median' }, 'Choose how the verdict is decided.'],
    [{ confidence: 90 }, 'The confidence must be at most 99.5 %.'],
    [{ confidence: 0.3 }, 'The confidence must be at least 50 %.'],
    [{ minPlants: 2.5 }, 'Enter a whole number of plants.'],
    [{ minPlants: 0 }, 'At least 1 plant.'],
  ])('%o → plain words', (extra, message) => {
    const r = creditRuleInputSchema.safeParse({ ...base, ...extra });
    expect(r.success).toBe(false);
    if (!r.success) expect(r.error.issues[0]?.message).toBe(message);
  });
});
