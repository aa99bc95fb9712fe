import type { Polygon } from 'geojson';
import { describe, expect, it } from 'vitest';
import { MAX_STOPS, PACE_LENGTH_M, newWalkSeed, suggestStops, walkPlan } from '../../shared/calc';
import { at, only } from '../helpers/lists';
import { codeOf, mulberry32 } from './prng';

// Invented outline in the open sea near 36° N, 125° W (no real place): about 300 m × 200 m.
const RECT: Polygon = {
  type: 'Polygon',
  coordinates: [[[-125, 36], [-124.99667, 36], [-124.99667, 36.0018], [-125, 36.0018], [-125, 36]]],
};
const positions = (p: ReturnType<typeof walkPlan>) => p.stops.map((s) => [s.lng, s.lat]);

describe('seeds: the same seed gives the same stops', () => {
  it('same seed → identical plan; another seed → other positions on the same line', () => {
    const a = walkPlan(RECT, { seed: 'north-7' });
    const b = walkPlan(RECT, { seed: 'north-7' });
    const c = walkPlan(RECT, { seed: 'north-8' });
    expect(b).toEqual(a);
    expect(a.seed).toBe('north-7');
    expect(positions(c)).not.toEqual(positions(a));
    // The line is the same; only the random start moves (every stop shifts by the same amount).
    expect(c.legs).toEqual(a.legs);
    expect(c.stops).toHaveLength(a.stops.length);
    const shift = at(c.stops, 0, 'stop').legDistanceM - at(a.stops, 0, 'stop').legDistanceM;
    c.stops.forEach((s, k) => expect(s.legDistanceM - at(a.stops, k, 'stop').legDistanceM).toBeCloseTo(shift, 6));
  });

  it('an integer seed and its decimal text are the same seed', () => {
    expect(positions(walkPlan(RECT, { seed: 42 }))).toEqual(positions(walkPlan(RECT, { seed: '42' })));
  });

  it('twenty different seeds give twenty different first-stop positions', () => {
    const firsts = new Set(Array.from({ length: 20 }, (_, i) => at(walkPlan(RECT, { seed: `s${i}` }).stops, 0, 'stop').legDistanceM.toFixed(3)));
    expect(firsts.size).toBe(20);
  });

  it('without a seed the plan is still stable, and reports the seed it used (which reproduces it)', () => {
    const a = walkPlan(RECT);
    expect(walkPlan(RECT)).toEqual(a);
    expect(positions(walkPlan(RECT, { seed: a.seed }))).toEqual(positions(a));
  });

  it('newWalkSeed: 12 base-36 characters, new each time; reproducible from a given random source', () => {
    const seeds = new Set(Array.from({ length: 50 }, () => newWalkSeed()));
    expect(seeds.size).toBe(50);
    for (const s of seeds) expect(s).toMatch(/^[0-9a-z]{12}$/);
    expect(newWalkSeed(mulberry32(5))).toBe(newWalkSeed(mulberry32(5)));
  });
});

describe('without a boundary: a square of the given area', () => {
  it('4 ha: a 200 m square, 180 m square inside a 10 m margin, diagonal 180·√2 = 254.56 m (hand-worked)', () => {
    const p = walkPlan(null, { areaHa: 4, seed: 1 });
    expect(p.mode).toBe('area');
    expect(p.pattern).toBe('square');
    expect(p.reason.code).toBe('no_boundary');
    expect(p.diagonalM).toBeCloseTo(180 * Math.SQRT2, 9);
    expect(p.walkLengthM).toBeCloseTo(180 * Math.SQRT2, 9);
    expect(p.walkableAreaHa).toBeCloseTo(3.24, 9);
    // 10 stops: one in each tenth of the line, 25.456 m apart.
    expect(p.spacingM).toBeCloseTo(18 * Math.SQRT2, 9);
    expect(p.spacingPaces).toBeCloseTo((18 * Math.SQRT2) / 0.76, 9);
    expect(p.spacingFt).toBeCloseTo((18 * Math.SQRT2) / 0.3048, 9);
    expect(p.stops).toHaveLength(10);
    const first = at(p.stops, 0, 'stop');
    expect(first.distanceM).toBeLessThan(18 * Math.SQRT2);
    p.stops.forEach((s, k) => {
      expect(s.distanceM - first.distanceM).toBeCloseTo(k * 18 * Math.SQRT2, 9);
      expect(s.paces).toBeCloseTo(s.distanceM / PACE_LENGTH_M, 9);
      expect(s).toMatchObject({ lng: null, lat: null, leg: 1 });
    });
    expect(p.start).toBeNull();
    expect(p.noteParts).toContainEqual({ code: 'no_boundary', areaHa: 4 });
    expect(p.note).toMatch(/square/);
  });

  it('0.01 ha (10 m square): 10 m and 5 m leave nothing; 2.5 m leaves 5 × 5 m = 25 %, the least allowed (hand-worked)', () => {
    const p = walkPlan(null, { areaHa: 0.01, stops: 3 });
    expect(p.edgeMarginM).toBe(2.5);
    expect(p.noteParts).toContainEqual({ code: 'margin_reduced', askedM: 10, usedM: 2.5 });
    expect(p.note).toMatch(/too small/);
  });

  it('one stop falls somewhere on the line, decided by the seed', () => {
    const p = walkPlan(null, { areaHa: 1, stops: 1, seed: 'one' });
    const stop = only(p.stops, 'stop');
    expect(stop.distanceM).toBeGreaterThanOrEqual(0);
    expect(stop.distanceM).toBeLessThanOrEqual(p.walkLengthM);
    expect(p.spacingM).toBe(0);
  });
});

describe('what the phone reads keeps its shape', () => {
  it('a Polygon, a Feature around it, and a MultiPolygon are all accepted', () => {
    const p = walkPlan(RECT, { stops: 12, areaHa: 6 });
    expect(p.mode).toBe('boundary');
    expect(p.stops).toHaveLength(12);
    expect(p.start).toHaveLength(2);
    expect(p.end).toHaveLength(2);
    expect(p.paceLengthM).toBe(PACE_LENGTH_M);
    expect(typeof p.note).toBe('string');
    expect(walkPlan({ type: 'Feature', properties: {}, geometry: RECT }).stops).toHaveLength(10);
    // A MultiPolygon of one part is that polygon.
    expect(walkPlan({ type: 'MultiPolygon', coordinates: [RECT.coordinates] }).pattern).toBe('diagonal');
  });
});

describe('how many stops', () => {
  // The rule of thumb itself is common practice, no published source: the rule's minimum up to
  // 20 ha, one more per 5 ha beyond, half as many again for a patchy stand, at most twice the minimum.
  it.each([
    [4, 10, false, 10, 'none'],
    [20, 10, false, 10, 'none'],
    [21, 10, false, 11, 'large'], // 1 ha over: ceil(1/5) = 1 more
    [40, 10, false, 14, 'large'], // 20 ha over: 4 more
    [200, 10, false, 20, 'large'], // 36 more, capped at 2 × 10
    [8, 10, true, 15, 'variable'], // 1.5 × 10
    [60, 10, true, 18, 'large_and_variable'], // 10 + 8 = 18 beats 15
    [30, 60, false, 62, 'large'],
    [30, 60, true, 90, 'large_and_variable'], // both apply; 1.5 × 60 = 90 is the larger
    [1000, 80, false, MAX_STOPS, 'large'], // never above the plan's limit
  ] as const)('%s ha, minimum %s, patchy %s → %s (%s)', (areaHa, minimum, variable, suggested, why) => {
    expect(suggestStops(areaHa, minimum, { variable })).toEqual({ minimum, suggested, source: 'common_practice', why });
  });

  it('the default minimum is the demo rule’s 10 plants', () => {
    expect(suggestStops(5).minimum).toBe(10);
    expect(walkPlan(RECT).stops).toHaveLength(10);
  });
});

describe('bad input', () => {
  it.each([
    ['no boundary, no area', null, {}, 'missing_area'],
    ['no boundary, zero area', null, { areaHa: 0 }, 'non_positive'],
    ['no boundary, NaN area', null, { areaHa: NaN }, 'non_positive'],
    ['a point, not a polygon', { type: 'Point', coordinates: [0, 0] }, {}, 'bad_boundary'],
    ['ring not closed', { type: 'Polygon', coordinates: [[[0, 0], [0.001, 0], [0.001, 0.001], [0, 0.001]]] }, {}, 'bad_boundary'],
    ['too few positions', { type: 'Polygon', coordinates: [[[0, 0], [0.001, 0], [0, 0]]] }, {}, 'bad_boundary'],
    ['NaN coordinate', { type: 'Polygon', coordinates: [[[0, 0], [NaN, 0], [0.001, 0.001], [0, 0]]] }, {}, 'bad_boundary'],
    ['latitude 100', { type: 'Polygon', coordinates: [[[0, 0], [0.001, 100], [0.001, 0.001], [0, 0]]] }, {}, 'bad_boundary'],
    ['all corners the same', { type: 'Polygon', coordinates: [[[0, 0], [0, 0], [0, 0], [0, 0]]] }, {}, 'bad_boundary'],
    ['empty MultiPolygon', { type: 'MultiPolygon', coordinates: [] }, {}, 'bad_boundary'],
    ['under 1 m across', { type: 'Polygon', coordinates: [[[0, 0], [0.000001, 0], [0, 0.000001], [0, 0]]] }, {}, 'boundary_too_small'],
    ['zero stops', RECT, { stops: 0 }, 'bad_option'],
    ['fractional stops', RECT, { stops: 2.5 }, 'bad_option'],
    ['101 stops', RECT, { stops: 101 }, 'bad_option'],
    ['negative margin', RECT, { edgeMarginM: -1 }, 'negative'],
    ['fractional seed', RECT, { seed: 1.5 }, 'bad_option'],
    ['empty seed', RECT, { seed: '' }, 'bad_option'],
    ['seed of 65 characters', RECT, { seed: 'x'.repeat(65) }, 'bad_option'],
    ['suggestion for zero hectares', 'suggest', { areaHa: 0 }, 'non_positive'],
  ])('%s → %s', (_n, boundary, opts, code) => {
    if (boundary === 'suggest') expect(codeOf(() => suggestStops((opts as { areaHa: number }).areaHa))).toBe(code);
    else expect(codeOf(() => walkPlan(boundary as never, opts as never))).toBe(code);
  });
});
