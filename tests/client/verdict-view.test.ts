import { describe, expect, it } from 'vitest';
import { fitCalibration } from '../../shared/calc';
import { decideVerdict, type VerdictResult } from '../../shared/calc/verdict';
import { ruleSettings } from '../../client/lib/rule-settings';
import { storedVerdictView, verdictView } from '../../client/features/estimate/verdict-view';

/*
 * The phone's verdict mapping: state, headline, mark and figures of a decided verdict. Unit factors
 * are the exact published ones (NIST SP 811: 1 lb = 0.45359237 kg, 1 acre = 0.40468564224 ha), typed
 * here rather than taken from the code.
 */
const KG_PER_LB = 0.45359237;
const HA_PER_ACRE = 0.40468564224;
const lbAcToKgHa = (lb: number) => (lb * KG_PER_LB) / HA_PER_ACRE;
const US = { lang: 'en', units: 'us' } as const;
const ES = { lang: 'es', units: 'us' } as const;

/** A hand-made verdict: only what the view reads. */
function verdict(p: Partial<VerdictResult> & Pick<VerdictResult, 'verdict' | 'biomassKgHa'>): VerdictResult {
  return {
    decisionBasis: 'point_with_borderline',
    confidence: 0.9,
    minPlants: 10,
    thresholdKgHa: lbAcToKgHa(4500),
    n: 10,
    meanLengthCm: 80,
    sdLengthCm: 5,
    combined: { interval: [lbAcToKgHa(4000), lbAcToKgHa(7000)], spreadKnown: true } as VerdictResult['combined'],
    lengthForThresholdCm: 78,
    extrapolated: false,
    reasons: [],
    cautions: [],
    morePlants: null,
    ...p,
  };
}

describe('verdictView: figures as the office shows them', () => {
  it('whole lb/ac, not rounded to tens: 6,335 kg/ha is 5,652 lb/ac', () => {
    // 6335 × 0.40468564224 / 0.45359237 = 5,651.95 lb/ac → "5,652" (the old phone said "5,650").
    const v = verdictView(verdict({ verdict: 'meets', biomassKgHa: 6335 }), US);
    expect(v.biomass).toBe('5,652 lb/ac');
    expect(v.threshold).toBe('4,500 lb/ac');
    expect(v.headline).toBe('meets');
    // 4000 and 7000 lb/ac round-trip to themselves.
    expect(v.range).toBe('90% range: 4,000–7,000 lb/ac');
  });

  it('a value just under the threshold never shows as the threshold itself', () => {
    // 4,499.7 lb/ac rounds to 4,500 whole: beside "below" it would contradict, so one decimal is shown.
    const v = verdictView(verdict({ verdict: 'below', biomassKgHa: lbAcToKgHa(4499.7) }), US);
    expect(v.biomass).toBe('4,499.7 lb/ac');
    expect(v.threshold).toBe('4,500.0 lb/ac');
    expect(v.headline).toBe('just_below');
    expect(v.mark).toBe('✗');
  });

  it('metric readers get kg/ha, and Spanish a Spanish range', () => {
    const v = verdictView(verdict({ verdict: 'meets', biomassKgHa: 6335 }), { lang: 'es', units: 'metric' });
    expect(v.biomass).toBe('6,335 kg/ha');
    expect(v.range).toMatch(/^rango del 90 %: /);
  });
});

describe('verdictView: three states, one look each', () => {
  it('borderline never carries a tick, whatever the point estimate says', () => {
    const v = verdictView(verdict({ verdict: 'borderline', biomassKgHa: 6335 }), US);
    expect(v.state).toBe('borderline');
    expect(v.mark).not.toBe('✓');
    expect(v.mark).not.toBe('✗');
    expect(v.headline).toBe('borderline');
  });

  it('too few plants and an unknown spread say so in the headline', () => {
    const few = verdictView(verdict({ verdict: 'borderline', biomassKgHa: 6335, reasons: [{ code: 'too_few_plants', n: 2, minPlants: 10 }] }), US);
    expect(few.headline).toBe('borderline_few');
    const spread = verdictView(
      verdict({ verdict: 'borderline', biomassKgHa: 6335, reasons: [{ code: 'unknown_spread', n: 2 }], combined: { interval: null, spreadKnown: false } as unknown as VerdictResult['combined'] }),
      US,
    );
    expect(spread.headline).toBe('borderline_spread');
    expect(spread.range).toBeNull();
    expect(spread.spreadKnown).toBe(false);
  });
});

describe('verdictView through the estimation core', () => {
  // A linear calibration worked by hand: y = 70·x with ±100 kg/ha alternating scatter, x 40..120 cm.
  const points = Array.from({ length: 9 }, (_, i) => ({ x: 40 + 10 * i, y: 70 * (40 + 10 * i) + (i % 2 ? 100 : -100) }));
  const fit = fitCalibration(points, 'linear');
  const rule = ruleSettings({ thresholdKgHa: lbAcToKgHa(4500) });

  it('two plants under a minimum of 10: "borderline — too few plants", and 8 more to reach it', () => {
    // 100 cm → about 7,000 kg/ha, far above 5,044: the point estimate meets, but 2 < 10 caps it at borderline.
    const v = verdictView(decideVerdict(fit, [99, 101], rule), US);
    expect(v.state).toBe('borderline');
    expect(v.headline).toBe('borderline_few');
    expect(v.advice).toBe('Measure 8 more plants to reach the minimum of 10.'); // 10 − 2 = 8
    expect(v.reasons.join(' ')).toContain('Only 2 plants measured; the rule asks for at least 10.');
    expect(v.reasons.join(' ')).not.toContain('kg/ha'); // the US reader's units throughout
  });

  it('in Spanish: the same verdict worded for the reader', () => {
    const v = verdictView(decideVerdict(fit, [99, 101], rule), ES);
    expect(v.headline).toBe('borderline_few');
    expect(v.reasons.join(' ')).toContain('Solo se midieron 2 plantas; la regla pide al menos 10.');
    expect(v.advice).toBe('Mida 8 plantas más para llegar al mínimo de 10.');
  });

  it('equal lengths: the spread is unknown, never settled', () => {
    const v = verdictView(decideVerdict(fit, [82, 82], { ...rule, minPlants: 2 }), US);
    expect(v.state).toBe('borderline');
    expect(v.headline).toBe('borderline_spread');
    expect(v.range).toBeNull();
  });
});

describe('storedVerdictView', () => {
  const base = { n: 10, meanLengthCm: 80, biomassKgHa: 6335, interval: [5000, 7000] as [number, number], level: 0.9, thresholdKgHa: lbAcToKgHa(4500), extrapolated: false };
  it('an older snapshot keeps the meets/below it was stored with', () => {
    expect(storedVerdictView({ ...base, meetsThreshold: true }, US).state).toBe('meets');
    expect(storedVerdictView({ ...base, meetsThreshold: false }, US).state).toBe('below');
  });
  it('a snapshot with a verdict keeps that verdict (no tick on borderline)', () => {
    const v = storedVerdictView({ ...base, meetsThreshold: true, verdict: 'borderline', combinedInterval: [4000, 8000] }, US);
    expect(v.state).toBe('borderline');
    expect(v.mark).toBe('?');
  });
});

describe('ruleSettings', () => {
  it('fills the demo values while the server sends none', () => {
    expect(ruleSettings({ thresholdKgHa: 5000 })).toEqual({ thresholdKgHa: 5000, decisionBasis: 'point_with_borderline', confidence: 0.9, minPlants: 10, edgeMarginM: 10 });
  });
  it("keeps the rule's own values, and ignores unusable ones", () => {
    expect(ruleSettings({ thresholdKgHa: 5000, decisionBasis: 'lower_bound', confidence: 0.95, minPlants: 12, edgeMarginM: 15 })).toEqual({
      thresholdKgHa: 5000, decisionBasis: 'lower_bound', confidence: 0.95, minPlants: 12, edgeMarginM: 15,
    });
    expect(ruleSettings({ thresholdKgHa: 5000, decisionBasis: 'guess', confidence: 90, minPlants: 2.5, edgeMarginM: -1 })).toEqual({
      thresholdKgHa: 5000, decisionBasis: 'point_with_borderline', confidence: 0.9, minPlants: 10, edgeMarginM: 10,
    });
  });
});
