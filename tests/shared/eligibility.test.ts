import { describe, expect, it } from 'vitest';
import { CEREAL_CROPS, CROPS, DEMO_RULE, creditEligibility, lbPerAcToKgPerHa } from '../../shared/calc';
import { codeOf } from './prng';

const planting = { crop: 'cereal_rye', seededOn: '2023-10-15', terminatedOn: '2024-03-01', areaHa: 10 };
const walk = { biomassKgHa: 6000, walkedOn: '2024-02-20' };

describe('DEMO_RULE and crop lists', () => {
  it('typical values (product brief) and invented demo values, converted exactly', () => {
    // 4,500 lb/ac and 90 days: product brief ("about 5,044 kg/ha"); 50 lb N/ac and 30 days: invented.
    expect(DEMO_RULE.thresholdKgHa).toBeCloseTo(5043.8302029, 6);
    expect(DEMO_RULE.thresholdKgHa).toBe(lbPerAcToKgPerHa(4500));
    expect(DEMO_RULE.minDaysInWindow).toBe(90);
    expect(DEMO_RULE.window).toEqual({ start: '10-01', end: '03-31' });
    expect(DEMO_RULE.creditKgNPerHa).toBeCloseTo(56.0425578, 6);
    expect(DEMO_RULE.maxDaysSampleBeforeTermination).toBe(30);
    expect(DEMO_RULE.eligibleCrops).toEqual([...CEREAL_CROPS]);
    expect(CROPS).toEqual(['cereal_rye', 'triticale', 'barley', 'oats', 'wheat', 'legume', 'mix', 'other']);
    expect(CEREAL_CROPS).toEqual(CROPS.slice(0, 5));
  });
});

describe('creditEligibility', () => {
  it('eligible: days counted, credit = credit per ha × area', () => {
    const r = creditEligibility(planting, walk, DEMO_RULE);
    // Oct 15–31 (17) + Nov 30 + Dec 31 + Jan 31 + Feb 1–29 (29) = 138 days, by hand.
    expect(r).toEqual({
      eligible: true,
      reasons: [],
      daysInWindow: 138,
      projected: false,
      endOn: '2024-03-01',
      creditKgN: DEMO_RULE.creditKgNPerHa * 10,
    });
  });

  it.each([
    ['legume', { ...planting, crop: 'legume' }, walk, ['crop_not_eligible']],
    ['late seeding', { ...planting, seededOn: '2024-01-15' }, walk, ['too_few_days_in_window']],
    ['no walk', planting, null, ['no_estimate']],
    ['low biomass', planting, { ...walk, biomassKgHa: 4000 }, ['below_threshold']],
    ['walked after termination', planting, { ...walk, walkedOn: '2024-03-05' }, ['sample_after_termination']],
    ['walked 56 days before termination', planting, { ...walk, walkedOn: '2024-01-05' }, ['sample_too_early']],
    ['everything wrong', { ...planting, crop: 'mix', seededOn: '2024-01-20' }, { biomassKgHa: 100, walkedOn: '2024-03-09' },
      ['crop_not_eligible', 'too_few_days_in_window', 'below_threshold', 'sample_after_termination']],
  ])('%s → %j', (_n, p, w, codes) => {
    const r = creditEligibility(p, w, DEMO_RULE);
    expect(r.eligible).toBe(false);
    expect(r.creditKgN).toBe(0);
    expect(r.reasons.map((x) => x.code)).toEqual(codes);
    for (const x of r.reasons) expect(x.message.length).toBeGreaterThan(10);
  });

  it('exactly at the limits passes (≥ threshold, ≥ days, ≤ max days before termination)', () => {
    const p = { ...planting, seededOn: '2023-10-01', terminatedOn: '2023-12-30' }; // 90 days
    const r = creditEligibility(p, { biomassKgHa: DEMO_RULE.thresholdKgHa, walkedOn: '2023-11-30' }, DEMO_RULE);
    expect(r.daysInWindow).toBe(90);
    expect(r.eligible).toBe(true);
  });

  it('no termination date: a projection to rule.today, marked as such', () => {
    const r = creditEligibility({ ...planting, terminatedOn: null }, walk, { ...DEMO_RULE, today: '2024-02-25' });
    expect(r.projected).toBe(true);
    expect(r.endOn).toBe('2024-02-25');
    expect(r.daysInWindow).toBe(133);
    expect(r.eligible).toBe(true);
  });

  it('no termination date and no today: says so, days unknown', () => {
    const r = creditEligibility({ ...planting, terminatedOn: null }, walk, DEMO_RULE);
    expect(r.daysInWindow).toBeNull();
    expect(r.reasons.map((x) => x.code)).toEqual(['no_end_date']);
  });

  it.each([
    ['terminated before seeding', { ...planting, terminatedOn: '2023-09-01' }, walk, 'dates_out_of_order'],
    ['walk before seeding', planting, { ...walk, walkedOn: '2023-09-01' }, 'dates_out_of_order'],
    ['bad seeding date', { ...planting, seededOn: '15/10/2023' }, walk, 'bad_date'],
    ['zero area', { ...planting, areaHa: 0 }, walk, 'non_positive'],
    ['NaN biomass', planting, { ...walk, biomassKgHa: NaN }, 'not_finite'],
  ])('%s → %s', (_n, p, w, code) => {
    expect(codeOf(() => creditEligibility(p as never, w as never, DEMO_RULE))).toBe(code);
  });

  it('malformed rule window is a typed error', () => {
    expect(codeOf(() => creditEligibility(planting, walk, { ...DEMO_RULE, window: { start: '10-01', end: '3-31' } }))).toBe('bad_window');
  });
});
