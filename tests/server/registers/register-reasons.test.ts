import { describe, expect, it } from 'vitest';
import { registerRow, type RegisterRule } from '../../../server/registers/service';
import { at, only } from '../../helpers/lists';

/*
 * A register row says what is true about a missing estimate. Hand-made inputs: 4 ha of oats seeded
 * 2026-11-01, terminated 2027-03-20; the rule (demo values) wants 90 window days, which 139 are
 * (Nov 30 + Dec 31 + Jan 31 + Feb 28 + Mar 1-19 19), so the only reason left is the estimate.
 */
const rule: RegisterRule = {
  id: 'r1',
  version: 1,
  label: 'Demo rule',
  effectiveFrom: '2026-01-01',
  isDemo: true,
  thresholdKgHa: 5000,
  minDaysInWindow: 90,
  window: { start: '10-01', end: '03-31' },
  eligibleCrops: ['oats', 'cereal_rye'],
  creditKgNPerHa: 56,
  maxDaysSampleBeforeTermination: 30,
};

const field = {
  ranchId: 'ra',
  ranchName: 'Ranch',
  fieldId: 'f1',
  fieldName: 'Oat Flat',
  areaHa: 4,
  plantingId: 'p1',
  crop: 'oats',
  variety: null,
  seededOn: '2026-11-01',
  plannedTerminationOn: null,
  terminatedOn: '2027-03-20',
};

describe('the reason for a missing estimate', () => {
  it('names the approved walk without an estimate and the crop without a calibration', () => {
    const row = registerRow(field, [{ id: 'w1', plantingId: 'p1', walkedOn: '2027-03-07', estimate: null }], rule, '2027-03-25', '2026-27');
    expect(row.reasons.map((r) => r.code)).toEqual(['no_estimate']);
    expect(only(row.reasons).message).toBe('The approved walk of 7 Mar has no estimate: no calibration is assigned for oats.');
  });

  it('asks for a walk when there is none', () => {
    const row = registerRow(field, [], rule, '2027-03-25', '2026-27');
    expect(at(row.reasons, 0).message).toBe('No biomass estimate yet: a field walk is needed.');
  });
});
