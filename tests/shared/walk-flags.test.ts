import { describe, expect, it } from 'vitest';
import {
  MAD_SCALE, OUTLIER_Z, explainWalkFlag, median, outlierIndexes, outlierStops, robustZ, walkFlags, type WalkFlag,
} from '../../shared/registry/walk-flags';
import type { WalkEstimate } from '../../shared/schemas/walks';

// The 3.5 cut-off and the 1.4826 scale: common practice (Iglewicz and Hoaglin's modified z-score),
// from memory. The expected values below are worked by hand from the definition
// z = |x − median| / (1.4826 · MAD), and, when the MAD is 0, |x − median| / (1.253314 · mean |x − median|).

describe('median', () => {
  const table: [number[], number][] = [
    [[3, 1, 2], 2],
    [[4, 1, 3, 2], 2.5],
    [[7], 7],
  ];
  for (const [values, expected] of table) {
    it(`median of ${values.join(', ')} is ${expected}`, () => expect(median(values)).toBe(expected));
  }
  it('is NaN for no values', () => expect(median([])).toBeNaN());
});

describe('robustZ and outlierIndexes', () => {
  const table: { name: string; values: number[]; outliers: number[]; z?: [number, number] }[] = [
    // median 3, deviations 2 1 0 1 5.1 → MAD 1: z(8.1) = 5.1 / 1.4826 = 3.4399, just under the cut-off.
    { name: 'just under 3.5', values: [1, 2, 3, 4, 8.1], outliers: [], z: [4, 5.1 / 1.4826] },
    // the same with 8.3: z = 5.3 / 1.4826 = 3.5748, just over.
    { name: 'just over 3.5', values: [1, 2, 3, 4, 8.3], outliers: [4], z: [4, 5.3 / 1.4826] },
    // median 10.1, MAD 0.25: z(30) = 19.9 / 0.37065 = 53.69; a slip of the tape or the keyboard.
    { name: 'a typing slip among six plants', values: [10, 10.5, 9.5, 10, 10.2, 30], outliers: [5], z: [5, 19.9 / (1.4826 * 0.25)] },
    // both tails: median 80, deviations 0 1 1 2 2 40 40 → MAD 2, z(40) = 40 / 2.9652 = 13.49.
    { name: 'one short and one tall', values: [80, 81, 79, 82, 78, 120, 40], outliers: [5, 6], z: [6, 40 / (1.4826 * 2)] },
    // fewer than 4 plants: nothing is called odd.
    { name: 'three plants', values: [10, 11, 90], outliers: [] },
    // MAD 0 (more than half equal): mean |x − median| = 40 / 5 = 8, z(120) = 40 / (1.253314 · 8) = 3.989.
    { name: 'MAD 0, mean deviation stands in', values: [80, 80, 80, 80, 120], outliers: [4], z: [4, 40 / (1.253314 * 8)] },
    // MAD 0 with four plants: mean deviation 2.5, z(90) = 10 / 3.1333 = 3.19, under the cut-off.
    { name: 'MAD 0, four plants, under the cut-off', values: [80, 80, 80, 90], outliers: [], z: [3, 10 / (1.253314 * 2.5)] },
    { name: 'all the same', values: [75, 75, 75, 75, 75], outliers: [], z: [0, 0] },
    // The demo's submitted walk (seeds/04_demo_walks.ts): an ordinary spread, no outlier.
    { name: 'an ordinary walk', values: [84.5, 77.0, 91.5, 80.0, 73.5, 88.0, 79.0, 86.5, 82.0, 76.5], outliers: [] },
  ];
  for (const row of table) {
    it(row.name, () => {
      expect(outlierIndexes(row.values)).toEqual(row.outliers);
      if (row.z) expect(robustZ(row.values)[row.z[0]]).toBeCloseTo(row.z[1], 9);
    });
  }

  it('uses 3.5 and 1.4826 by default, and takes another cut-off', () => {
    expect(OUTLIER_Z).toBe(3.5);
    expect(MAD_SCALE).toBe(1.4826);
    expect(outlierIndexes([1, 2, 3, 4, 8.1], 3)).toEqual([4]);
  });
});

const estimate = (over: Partial<WalkEstimate> = {}): WalkEstimate => ({
  calibrationId: 'cal-1',
  calibrationVersion: 1,
  n: 10,
  meanLengthCm: 82,
  biomassKgHa: 5400,
  interval: [4200, 6600],
  samplingRange: [5100, 5700],
  level: 0.9,
  thresholdKgHa: 5044,
  meetsThreshold: true,
  extrapolated: false,
  morePlantsSuggested: 0,
  note: 'invented',
  ...over,
});
const tenPlants = [84.5, 77.0, 91.5, 80.0, 73.5, 88.0, 79.0, 86.5, 82.0, 76.5].map((lengthCm, i) => ({ stop: i + 1, lengthCm }));
const codes = (flags: WalkFlag[]) => flags.map((f) => f.code);

describe('walkFlags', () => {
  it('an ordinary walk has no flags', () => {
    expect(walkFlags({ plants: tenPlants, estimate: estimate() })).toEqual([]);
  });

  it('flags an outlier with its stop, length and robust z', () => {
    const plants = tenPlants.map((p) => (p.stop === 4 ? { ...p, lengthCm: 8.0 } : p));
    const flags = walkFlags({ plants, estimate: estimate() });
    expect(codes(flags)).toEqual(['outlier']);
    const f = flags[0] as Extract<WalkFlag, { code: 'outlier' }>;
    expect(f.plants.map((p) => [p.stop, p.lengthCm])).toEqual([[4, 8]]);
    expect(f.plants[0]?.z).toBeGreaterThan(OUTLIER_Z);
    expect(outlierStops(flags)).toEqual(new Set([4]));
  });

  it('flags an extrapolated estimate, and a missing one', () => {
    expect(codes(walkFlags({ plants: tenPlants, estimate: estimate({ extrapolated: true }) }))).toEqual(['extrapolated']);
    expect(codes(walkFlags({ plants: tenPlants, estimate: null }))).toEqual(['no_calibration']);
  });

  it('flags fewer than the usual 10 plants (USUAL_SAMPLE_SIZE), not 10 or more', () => {
    expect(codes(walkFlags({ plants: tenPlants.slice(0, 9), estimate: estimate() }))).toEqual(['few_plants']);
    expect(codes(walkFlags({ plants: tenPlants, estimate: estimate() }))).toEqual([]);
  });

  it('flags borderline exactly when the stored verdict is borderline, not from the old sampling range', () => {
    const reasons = [{ code: 'interval_spans_threshold' as const, lowKgHa: 4800, highKgHa: 5300, thresholdKgHa: 5044, level: 0.9 }];
    const borderline = estimate({ verdict: 'borderline', decisionBasis: 'point_with_borderline', verdictReasons: reasons, morePlants: { kind: 'calibration_spans_threshold' } });
    const flags = walkFlags({ plants: tenPlants, estimate: borderline });
    expect(flags).toEqual([{ code: 'borderline', reasons, morePlants: { kind: 'calibration_spans_threshold' } }]);
    // A range across the threshold under the point basis is a meets verdict: no borderline flag beside it.
    expect(codes(walkFlags({ plants: tenPlants, estimate: estimate({ samplingRange: [4800, 5300], verdict: 'meets', decisionBasis: 'point' }) }))).toEqual([]);
    // An old snapshot (no verdict stored) is never flagged borderline from its sampling range.
    expect(codes(walkFlags({ plants: tenPlants, estimate: estimate({ samplingRange: [4800, 5300], morePlantsSuggested: 6 }) }))).toEqual([]);
  });

  it('few plants: against the rule\'s minimum the walk was judged by, when stored', () => {
    expect(codes(walkFlags({ plants: tenPlants, estimate: estimate({ minPlants: 12 }) }))).toEqual(['few_plants']);
    expect(codes(walkFlags({ plants: tenPlants.slice(0, 5), estimate: estimate({ minPlants: 5 }) }))).toEqual([]);
  });

  it('lists several flags in a fixed order', () => {
    const plants = [{ stop: 1, lengthCm: 80 }, { stop: 2, lengthCm: 81 }, { stop: 3, lengthCm: 79 }, { stop: 4, lengthCm: 80.5 }, { stop: 5, lengthCm: 200 }];
    const e = estimate({ extrapolated: true, verdict: 'borderline', decisionBasis: 'point_with_borderline', verdictReasons: [{ code: 'too_few_plants', n: 5, minPlants: 10 }] });
    expect(codes(walkFlags({ plants, estimate: e }))).toEqual(['outlier', 'extrapolated', 'few_plants', 'borderline']);
  });
});

describe('explainWalkFlag', () => {
  const units = { length: (cm: number) => `${cm} cm`, biomass: (kg: number) => `${kg} kg/ha` };
  it('says which stops are odd and against what', () => {
    const text = explainWalkFlag({ code: 'outlier', plants: [{ stop: 4, lengthCm: 8, z: 9 }], medianCm: 81 }, units);
    expect(text).toContain('stop 4 (8 cm)');
    expect(text).toContain('median of 81 cm');
  });
  it('words a borderline verdict from its stored reasons and stated-power advice, in the reader\'s units', () => {
    // 4,800 and 5,300 kg/ha ÷ 1.12085 (kg/ha per lb/ac, NIST SP 811) = 4,282 and 4,729 lb/ac; 5,044 kg/ha = 4,500 lb/ac.
    const f = {
      code: 'borderline' as const,
      reasons: [
        { code: 'too_few_plants' as const, n: 6, minPlants: 10 },
        { code: 'interval_spans_threshold' as const, lowKgHa: 4800, highKgHa: 5300, thresholdKgHa: 5044, level: 0.9 },
      ],
      morePlants: { kind: 'measure_more' as const, more: 14, total: 20, power: 0.8, alpha: 0.1, sided: 'two' as const },
    };
    const text = explainWalkFlag(f, { ...units, system: 'us' });
    expect(text).toContain('Only 6 plants measured; the rule asks for at least 10.');
    expect(text).toContain('The 90% range (4,282–4,729 lb/ac) spans the 4,500 lb/ac threshold');
    expect(text).toContain('About 14 more plants would give an 80% chance of settling it.');
    expect(text).not.toMatch(/likely/);
    expect(explainWalkFlag(f, { ...units, system: 'metric' })).toContain('(4,800–5,300 kg/ha) spans the 5,044 kg/ha threshold');
    expect(explainWalkFlag({ ...f, morePlants: { kind: 'calibration_spans_threshold' } }, units)).toContain('more plants will not settle it');
  });
  it('words every other flag', () => {
    expect(explainWalkFlag({ code: 'extrapolated', meanLengthCm: 150 }, units)).toContain('150 cm');
    expect(explainWalkFlag({ code: 'no_calibration' }, units)).toContain('no published calibration');
    expect(explainWalkFlag({ code: 'few_plants', n: 1, usual: 10 }, units)).toMatch(/^1 plant measured/);
  });
});
