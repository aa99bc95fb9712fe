import { describe, expect, it } from 'vitest';
import { DEMO_RULE, creditEligibility, decideVerdict, fitCalibration, lbPerAcToKgPerHa, type VerdictReason } from '../../shared/calc';
import {
  DECISION_BASIS_WORDS, VERDICT_WORDS, adviceText, area, biomass, biomassAgainstThreshold, credit, date, dateTime, eligibilityReasonText, formatNumber, formatUpTo, length,
  nitrogenRate, percent, reasonText, verdictSentence,
} from '../../shared/format';
import { readDemo } from './demo-data';

// Conversions by hand with the exact factors (1 lb = 0.45359237 kg, 1 ac = 0.40468564224 ha, 1 in = 2.54 cm;
// NIST SP 811 App. B): 1 kg/ha = 0.40468564224/0.45359237 lb/ac = 0.892179 lb/ac.
describe('figures: the same rounding for every output', () => {
  it('numbers: thousands separators, half away from zero on the decimal value', () => {
    expect(formatNumber(5043.83)).toBe('5,044');
    expect(formatNumber(1234567.891, 2)).toBe('1,234,567.89');
    expect(formatNumber(1.005, 2)).toBe('1.01'); // toFixed would say 1.00
    expect(formatNumber(-2.5)).toBe('-3');
    expect(formatNumber(999.96, 1)).toBe('1,000.0');
    expect(formatNumber(NaN)).toBe('—');
    expect(formatNumber(4495.8, 0, 'es')).toBe('4,496'); // es-MX writes numbers as en-US
  });

  it('whole counts: formatNumber(n) groups thousands, as the office and import messages always wrote them', () => {
    expect(formatNumber(12345)).toBe('12,345');
    expect(formatNumber(1000000)).toBe('1,000,000');
    expect(formatNumber(999)).toBe('999');
    expect(formatNumber(0)).toBe('0');
    // Independent check: Intl's en-US writing of whole numbers, the text these messages carried before.
    for (const n of [1, 10, 100, 1000, 9999, 10000, 123456, 5000000, 2 ** 31]) expect(formatNumber(n)).toBe(n.toLocaleString('en-US'));
  });

  it('up to n decimals: trailing zeros dropped, the point too when nothing is left', () => {
    expect(formatUpTo(1234.5)).toBe('1,234.5'); // 1234.50 → drop one zero
    expect(formatUpTo(10.5, 2)).toBe('10.5'); // not "10.50"
    expect(formatUpTo(2.004)).toBe('2'); // 2.004 → 2.00 → "2"
    expect(formatUpTo(0.125)).toBe('0.13'); // half away from zero on the decimal value
    expect(formatUpTo(1.005)).toBe('1.01'); // toFixed would say 1.00
    expect(formatUpTo(100)).toBe('100'); // zeros before the point stay
    expect(formatUpTo(1200, 0)).toBe('1,200');
    expect(formatUpTo(2.25, 1)).toBe('2.3');
    expect(formatUpTo(-0.001)).toBe('0'); // rounds to zero: no minus sign
    expect(formatUpTo(NaN)).toBe('—');
    // Independent check: Intl's en-US with maximumFractionDigits, which import messages used before.
    for (const v of [0.1, 0.5, 1.25, 3.14159, 12.3456, 404.6856, 2000, 2241.85, 98765.4321, 1e6 + 0.07]) {
      for (const d of [0, 1, 2, 3]) expect(formatUpTo(v, d)).toBe(v.toLocaleString('en-US', { maximumFractionDigits: d }));
    }
  });

  it('biomass: 4,500 lb/ac is 5,043.83 kg/ha; whole units in both systems', () => {
    const kg = lbPerAcToKgPerHa(4500);
    expect(biomass(kg, 'us').full).toBe('4,500 lb/ac');
    expect(biomass(kg, 'metric').full).toBe('5,044 kg/ha');
    // 6,000 kg/ha × 0.892179 = 5,353.07 lb/ac
    expect(biomass(6000, 'us').text).toBe('5,353');
  });

  it('length, area, nitrogen, credit, percent', () => {
    expect(length(81.788, 'us').full).toBe('32.2 in'); // 81.788/2.54 = 32.2
    expect(length(81.788, 'metric').full).toBe('81.8 cm');
    expect(area(10, 'us').full).toBe('24.7 ac'); // 10/0.40468564224 = 24.71
    expect(area(10, 'metric').full).toBe('10.0 ha');
    expect(nitrogenRate(lbPerAcToKgPerHa(50), 'us').full).toBe('50 lb N/ac');
    expect(nitrogenRate(56.04, 'metric').full).toBe('56 kg N/ha');
    expect(credit(45.359237, 'us').full).toBe('100 lb N'); // 45.359237 kg / 0.45359237 = 100 lb
    expect(credit(45.359237, 'metric').full).toBe('45 kg N');
    expect(percent(0.9)).toBe('90%');
    expect(percent(0.9, 'es')).toBe('90 %');
  });

  it('dates: calendar day in the reader’s language, no time zone shift', () => {
    expect(date('2026-12-02')).toBe('Dec 2, 2026');
    expect(date('2026-12-02', 'es')).toBe('2 dic 2026');
    expect(date('2027-01-31', 'es')).toBe('31 ene 2027');
    expect(() => date('2026-02-30')).toThrow();
  });

  it('timestamps: day, 24-hour time and the zone written out, never a raw ISO string', () => {
    expect(dateTime('2026-12-02T14:05:09.123Z')).toBe('Dec 2, 2026, 14:05 UTC');
    expect(dateTime('2026-12-31T23:59:59Z', 'es')).toBe('31 dic 2026, 23:59 UTC');
    // SQLite's CURRENT_TIMESTAMP has no zone: it is UTC, whatever the server's own zone.
    expect(dateTime('2026-07-01 09:05:00')).toBe('Jul 1, 2026, 09:05 UTC');
    // Another zone when one is given: 00:30 UTC on Dec 2 is 16:30 the day before in Pacific
    // standard time (UTC−8 in December; IANA tz database, America/Los_Angeles).
    expect(dateTime('2026-12-02T00:30:00Z', 'en', 'America/Los_Angeles')).toBe('Dec 1, 2026, 16:30 PST');
    expect(dateTime(null)).toBe('—');
  });
});

describe('a shown value never contradicts its verdict', () => {
  const T = lbPerAcToKgPerHa(4500);
  it('4,495.8 lb/ac against 4,500: "4,496" (whole units already separate them)', () => {
    const c = biomassAgainstThreshold(lbPerAcToKgPerHa(4495.8), T, 'us');
    expect(c.value.text).toBe('4,496');
    expect(c.threshold.text).toBe('4,500');
    expect(c.atOrAbove).toBe(false);
    expect(c.nearness).toBeNull();
  });

  it('4,499.7 against 4,500: one more decimal and "just below"', () => {
    const c = biomassAgainstThreshold(lbPerAcToKgPerHa(4499.7), T, 'us');
    expect(c.value.text).toBe('4,499.7');
    expect(c.threshold.text).toBe('4,500.0');
    expect(c.nearness).toBe('just_below');
  });

  it('4,499.999 against 4,500: even 2 decimals tie, so the words must say it', () => {
    const c = biomassAgainstThreshold(lbPerAcToKgPerHa(4499.999), T, 'us');
    expect(c.wordsNeeded).toBe(true);
    expect(c.nearness).toBe('just_below');
    expect(reasonText({ code: 'point_below', biomassKgHa: lbPerAcToKgPerHa(4499.999), thresholdKgHa: T }, { lang: 'en', units: 'us' })).toContain('just below');
  });

  it('exactly at the threshold meets and shows equal numbers', () => {
    const c = biomassAgainstThreshold(T, T, 'metric');
    expect(c.atOrAbove).toBe(true);
    expect(c.value.text).toBe(c.threshold.text);
  });

  it('the property holds across values near the threshold, in both unit systems', () => {
    for (let d = -3; d <= 3; d += 0.01) {
      for (const units of ['us', 'metric'] as const) {
        const v = T + d;
        const c = biomassAgainstThreshold(v, T, units);
        if (c.wordsNeeded) continue;
        if (v >= T) expect(c.value.rounded).toBeGreaterThanOrEqual(c.threshold.rounded);
        else expect(c.value.rounded).toBeLessThan(c.threshold.rounded);
      }
    }
  });
});

describe('verdict sentences in the reader’s language and units', () => {
  const rye = fitCalibration(readDemo('cereal-rye').rows, 'power');
  const rule = { thresholdKgHa: DEMO_RULE.thresholdKgHa, decisionBasis: 'point_with_borderline' as const, confidence: 0.9, minPlants: 10 };

  it('two plants: borderline, too few plants, in lb/ac for a US reader and kg/ha for a metric one', () => {
    const v = decideVerdict(rye, [118, 122], rule);
    const en = verdictSentence(v, { lang: 'en', units: 'us' });
    expect(en).toMatch(/^Borderline\. Only 2 plants measured; the rule asks for at least 10\./);
    expect(en).toContain('lb/ac');
    expect(en).not.toContain('kg/ha');
    expect(en).toContain('Measure 8 more plants to reach the minimum of 10.');
    const es = verdictSentence(v, { lang: 'es', units: 'metric' });
    expect(es).toMatch(/^En el límite\. Solo se midieron 2 plantas; la regla pide al menos 10\./);
    expect(es).toContain('kg/ha');
    expect(es).not.toContain('lb/ac');
  });

  it('advice with its stated power', () => {
    expect(adviceText({ kind: 'measure_more', more: 12, total: 22, power: 0.8, alpha: 0.1, sided: 'two' }, { lang: 'en', units: 'us' }))
      .toBe('About 12 more plants would give an 80% chance of settling it.');
    expect(adviceText({ kind: 'measure_more', more: 12, total: 22, power: 0.8, alpha: 0.1, sided: 'two' }, { lang: 'es', units: 'us' }))
      .toBe('Unas 12 plantas más darían un 80 % de probabilidad de decidirlo.');
  });

  it('every reason code and advice kind has words in both languages', () => {
    const reasons = [
      { code: 'point_meets', biomassKgHa: 6000, thresholdKgHa: 5000 },
      { code: 'point_below', biomassKgHa: 4000, thresholdKgHa: 5000 },
      { code: 'lower_bound_meets', lowerBoundKgHa: 5100, thresholdKgHa: 5000, confidence: 0.9 },
      { code: 'lower_bound_below', lowerBoundKgHa: 4100, thresholdKgHa: 5000, confidence: 0.9 },
      { code: 'interval_spans_threshold', lowKgHa: 4000, highKgHa: 6000, thresholdKgHa: 5000, level: 0.9 },
      { code: 'interval_above_threshold', lowKgHa: 5100, highKgHa: 6000, thresholdKgHa: 5000, level: 0.9 },
      { code: 'interval_below_threshold', lowKgHa: 3000, highKgHa: 4000, thresholdKgHa: 5000, level: 0.9 },
      { code: 'too_few_plants', n: 1, minPlants: 10 },
      { code: 'unknown_spread', n: 1 },
      { code: 'unknown_spread', n: 10 },
      { code: 'extrapolated', meanLengthCm: 150, calibratedCm: [20, 130] },
    ] satisfies VerdictReason[];
    for (const r of reasons) {
      for (const lang of ['en', 'es'] as const) {
        const text = reasonText(r, { lang, units: 'metric' });
        expect(text.length, `${r.code} ${lang}`).toBeGreaterThan(20);
        expect(text).not.toMatch(/undefined|NaN/);
      }
    }
    expect(Object.keys(VERDICT_WORDS.es)).toEqual(['meets', 'below', 'borderline']);
    expect(Object.keys(DECISION_BASIS_WORDS.es).sort()).toEqual(['lower_bound', 'point', 'point_with_borderline']);
  });
});

describe('eligibility reasons in the reader’s units', () => {
  const planting = { crop: 'cereal_rye', seededOn: '2026-10-01', terminatedOn: '2027-03-20', areaHa: 10 };
  const threshold = lbPerAcToKgPerHa(4500);
  const rule = { ...DEMO_RULE, eligibleCrops: ['cereal_rye'], window: { start: '10-01', end: '03-31' } };

  it('below threshold: lb/ac for a US reader (the stored message stays SI English)', () => {
    const r = creditEligibility(planting, { biomassKgHa: lbPerAcToKgPerHa(4495.8), walkedOn: '2027-03-10' }, rule);
    const reason = r.reasons.find((x) => x.code === 'below_threshold')!;
    expect(reason.message).toContain('kg/ha');
    expect(eligibilityReasonText(reason, { lang: 'en', units: 'us' })).toBe('The estimated biomass, 4,496 lb/ac, is below the 4,500 lb/ac threshold.');
    expect(eligibilityReasonText(reason, { lang: 'es', units: 'metric' })).toBe('La biomasa estimada, 5,039 kg/ha, está por debajo del umbral de 5,044 kg/ha.');
    expect(threshold).toBeCloseTo(5043.83, 2);
  });

  it('days and dates in the reader’s language; old reasons without data keep their message', () => {
    const r = creditEligibility({ ...planting, terminatedOn: '2026-11-15' }, { biomassKgHa: 9000, walkedOn: '2026-11-10' }, rule);
    const days = r.reasons.find((x) => x.code === 'too_few_days_in_window')!;
    expect(eligibilityReasonText(days, { lang: 'es', units: 'us' })).toBe('El cultivo creció 45 días dentro del periodo de lluvias; la regla pide 90.');
    expect(eligibilityReasonText({ code: 'below_threshold', message: 'stored words' }, { lang: 'es', units: 'us' })).toBe('stored words');
    const crop = creditEligibility({ ...planting, crop: 'legume' }, null, rule).reasons.find((x) => x.code === 'crop_not_eligible')!;
    expect(eligibilityReasonText(crop, { lang: 'en', units: 'us' }, (c) => ({ legume: 'Legume', cereal_rye: 'Cereal rye' })[c] ?? c))
      .toBe('The crop "Legume" is not eligible under this rule (eligible: Cereal rye).');
  });
});
