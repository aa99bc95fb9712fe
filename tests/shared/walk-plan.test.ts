import { booleanPointInPolygon } from '@turf/boolean-point-in-polygon';
import { distance } from '@turf/distance';
import { point } from '@turf/helpers';
import type { Polygon } from 'geojson';
import { describe, expect, it } from 'vitest';
import { PACE_LENGTH_M, walkPlan } from '../../shared/calc';
import { codeOf } from './prng';

// Invented field outlines near 0°, 0° (open sea: no real place), about 300 m × 200 m.
const RECT: Polygon = {
  type: 'Polygon',
  coordinates: [[[0, 0], [0.0027, 0], [0.0027, 0.0018], [0, 0.0018], [0, 0]]],
};
// An L-shaped field: the longest corner-to-corner line crosses the missing quarter.
const ELL: Polygon = {
  type: 'Polygon',
  coordinates: [[[0, 0], [0.004, 0], [0.004, 0.001], [0.001, 0.001], [0.001, 0.004], [0, 0.004], [0, 0]]],
};
const TRIANGLE: Polygon = { type: 'Polygon', coordinates: [[[0, 0], [0.003, 0], [0, 0.002], [0, 0]]] };

const m = (a: number[], b: number[]) => distance(point(a), point(b), { units: 'meters' });

describe('walkPlan with a boundary', () => {
  it('rectangle: the corner-to-corner diagonal, 10 m in from each end, 10 evenly spaced stops', () => {
    const p = walkPlan(RECT);
    expect(p.mode).toBe('boundary');
    expect(p.diagonalM).toBeCloseTo(m([0, 0], [0.0027, 0.0018]), 6);
    expect(p.edgeMarginM).toBe(10);
    expect(p.walkLengthM).toBeCloseTo(p.diagonalM - 20, 9);
    expect(p.stops).toHaveLength(10);
    expect(p.spacingM).toBeCloseTo(p.walkLengthM / 9, 9);
    const corners = [[0, 0], [0.0027, 0.0018], [0.0027, 0], [0, 0.0018]];
    const first = p.stops[0];
    const last = p.stops[9];
    const nearest = (s: { lng: number | null; lat: number | null }) => Math.min(...corners.map((c) => m([s.lng!, s.lat!], c)));
    expect(nearest(first)).toBeCloseTo(10, 1);
    expect(nearest(last)).toBeCloseTo(10, 1);
    p.stops.forEach((s, i) => {
      expect(s.index).toBe(i + 1);
      expect(s.distanceM).toBeCloseTo(i * p.spacingM, 9);
      expect(s.distanceFt).toBeCloseTo(s.distanceM / 0.3048, 9);
      expect(s.paces).toBeCloseTo(s.distanceM / PACE_LENGTH_M, 9);
      expect(booleanPointInPolygon(point([s.lng!, s.lat!]), RECT)).toBe(true);
      if (i > 0) expect(m([s.lng!, s.lat!], [p.stops[i - 1].lng!, p.stops[i - 1].lat!])).toBeCloseTo(p.spacingM, 1);
    });
    expect(p.areaHa).toBeGreaterThan(5.5);
    expect(p.areaHa).toBeLessThan(6.5);
  });

  it('L-shaped field: the line stays inside (not the corner-to-corner line across the gap)', () => {
    const p = walkPlan(ELL, { stops: 12 });
    expect(p.diagonalM).toBeCloseTo(m([0, 0], [0.004, 0.001]), 3);
    for (const s of p.stops) expect(booleanPointInPolygon(point([s.lng!, s.lat!]), ELL)).toBe(true);
    expect(p.diagonalM).toBeLessThan(m([0.004, 0], [0, 0.004]));
  });

  it('triangle (no diagonals): corner to the middle of the opposite side', () => {
    const p = walkPlan(TRIANGLE, { stops: 5 });
    expect(p.stops).toHaveLength(5);
    for (const s of p.stops) expect(booleanPointInPolygon(point([s.lng!, s.lat!]), TRIANGLE)).toBe(true);
  });

  it('a GeoJSON Feature around the polygon is accepted', () => {
    const p = walkPlan({ type: 'Feature', properties: {}, geometry: RECT });
    expect(p.stops).toHaveLength(10);
  });
});

describe('walkPlan without a boundary', () => {
  it('4 ha square: diagonal 282.84 m less two 10 m margins, in metres, feet and paces', () => {
    const p = walkPlan(null, { areaHa: 4 });
    expect(p.mode).toBe('area');
    expect(p.diagonalM).toBeCloseTo(200 * Math.SQRT2, 9);
    expect(p.walkLengthM).toBeCloseTo(200 * Math.SQRT2 - 20, 9);
    expect(p.walkLengthFt).toBeCloseTo(p.walkLengthM / 0.3048, 9);
    expect(p.spacingPaces).toBeCloseTo(p.spacingM / 0.76, 9);
    expect(p.stops[9].distanceM).toBeCloseTo(p.walkLengthM, 9);
    expect(p.stops[0]).toMatchObject({ lng: null, lat: null, distanceM: 0 });
    expect(p.start).toBeNull();
    expect(p.note).toMatch(/square/);
  });

  it('tiny field: margin reduced, and said', () => {
    const p = walkPlan(null, { areaHa: 0.01, stops: 3 }); // 10 m × 10 m, diagonal 14.1 m
    expect(p.edgeMarginM).toBeCloseTo(0.4 * 10 * Math.SQRT2, 9);
    expect(p.walkLengthM).toBeGreaterThan(0);
    expect(p.note).toMatch(/reduced/);
  });

  it('one stop sits mid-walk', () => {
    const p = walkPlan(null, { areaHa: 1, stops: 1 });
    expect(p.stops[0].distanceM).toBeCloseTo(p.walkLengthM / 2, 9);
  });
});

describe('walkPlan bad input', () => {
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
    ['zero stops', RECT, { stops: 0 }, 'bad_option'],
    ['fractional stops', RECT, { stops: 2.5 }, 'bad_option'],
    ['negative margin', RECT, { edgeMarginM: -1 }, 'negative'],
  ])('%s → %s', (_n, boundary, opts, code) => {
    expect(codeOf(() => walkPlan(boundary as never, opts as never))).toBe(code);
  });
});
