import { readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import geodesic from 'geographiclib-geodesic';
import type { Geometry, MultiPolygon, Polygon, Position } from 'geojson';
import GeometryFactory from 'jsts/org/locationtech/jts/geom/GeometryFactory.js';
import GeoJSONReader from 'jsts/org/locationtech/jts/io/GeoJSONReader.js';
import 'jsts/org/locationtech/jts/monkey.js';
import { describe, expect, it } from 'vitest';
import { walkPlan, type WalkPlan } from '../../shared/calc/walk-plan';
import { at, only } from '../helpers/lists';

// The plan's own geometry (shared/geo/plane.ts) is checked here against two libraries it does not
// use: JSTS (planar distances and containment) on coordinates projected with geographiclib's
// azimuthal equidistant construction, and geographiclib's geodesics (Karney's algorithms on WGS84).

const G = geodesic.Geodesic.WGS84;
const FIXTURES = join(dirname(fileURLToPath(import.meta.url)), '..', 'fixtures', 'boundaries');

interface Fixture {
  field: Polygon | MultiPolygon;
  parts: Record<string, Array<{ label: string; geometry: Polygon }>>;
}

function fixture(name: string): Fixture {
  const fc = JSON.parse(readFileSync(join(FIXTURES, `${name}.geojson`), 'utf8'));
  const out: Fixture = { field: fc.features[0].geometry, parts: {} };
  for (const f of fc.features.slice(1)) (out.parts[f.properties.cut] ??= []).push({ label: f.properties.label, geometry: f.geometry });
  return out;
}

/** A GeoJSON position as [longitude, latitude], which every position here has. */
function lonLat(p: Position): [number, number] {
  const [lon, lat] = p;
  if (lon === undefined || lat === undefined) throw new Error(`a position without both coordinates: ${JSON.stringify(p)}`);
  return [lon, lat];
}

/** Azimuthal equidistant coordinates (metres) about a centre, from geographiclib's inverse problem. */
function projector(field: Polygon | MultiPolygon) {
  const all = (field.type === 'Polygon' ? [field.coordinates] : field.coordinates).flat(2).map(lonLat);
  const lon0 = (Math.min(...all.map(([lon]) => lon)) + Math.max(...all.map(([lon]) => lon))) / 2;
  const lat0 = (Math.min(...all.map(([, lat]) => lat)) + Math.max(...all.map(([, lat]) => lat))) / 2;
  return (p: Position): number[] => {
    const [lon, lat] = lonLat(p);
    const r = G.Inverse(lat0, lon0, lat, lon);
    const a = (r.azi1! * Math.PI) / 180;
    return [r.s12! * Math.sin(a), r.s12! * Math.cos(a)];
  };
}

const reader = new GeoJSONReader(new GeometryFactory());
function jsts(geometry: Geometry, project: (p: Position) => number[]) {
  const map = (c: unknown): unknown => (typeof (c as number[])[0] === 'number' ? project(c as Position) : (c as unknown[]).map(map));
  return reader.read({ type: geometry.type, coordinates: map((geometry as Polygon).coordinates) });
}

const karney = (a: Position, b: Position) => {
  const [lonA, latA] = lonLat(a);
  const [lonB, latB] = lonLat(b);
  return G.Inverse(latA, lonA, latB, lonB).s12!;
};
/** Geodesic area (m²) from geographiclib's polygon routine. */
function geodesicArea(p: Polygon): number {
  const poly = G.Polygon(false);
  for (const [lon, lat] of at(p.coordinates, 0, 'outer ring').slice(0, -1).map(lonLat)) poly.AddPoint(lat, lon);
  return Math.abs(poly.Compute(false, true).area!);
}

const SHAPES = ['strip', 'rectangle', 'ell', 'cee', 'hole', 'two-part'] as const;
const SEEDS: Array<string | number> = ['a', 'b', 'field-7', 42, 2026];

describe('every stop and leg keeps the margin from every edge (JSTS on azimuthal equidistant coordinates)', () => {
  it.each(SHAPES)('%s', (name) => {
    const { field } = fixture(name);
    const project = projector(field);
    const shape = jsts(field, project);
    const edge = shape.getBoundary();
    for (const seed of SEEDS) {
      for (const stops of [10, 23]) {
        const plan = walkPlan(field, { seed, stops });
        expect(plan.edgeMarginM).toBe(10);
        expect(plan.stops).toHaveLength(stops);
        for (const s of plan.stops) {
          const pt = jsts({ type: 'Point', coordinates: [s.lng!, s.lat!] }, project);
          expect(shape.contains(pt), `${name} stop ${s.index}`).toBe(true);
          expect(edge.distance(pt), `${name} stop ${s.index}`).toBeGreaterThanOrEqual(10);
        }
        // The sampling path never leaves the buffered field.
        for (const leg of plan.legs) {
          const line = jsts({ type: 'LineString', coordinates: [leg.start!, leg.end!] }, project);
          expect(shape.contains(line)).toBe(true);
          expect(edge.distance(line)).toBeGreaterThanOrEqual(10);
        }
      }
    }
  });

  it('outlines of 5,000 corners (a six-petal flower and a wobbly circle, made here) keep the margin too', () => {
    // Planned on a simplified outline; the check is on every one of the 5,000 corners.
    const n = 5000;
    const outline = (radius: (k: number) => number): Polygon => {
      const ring = Array.from({ length: n }, (_, k): Position => {
        const a = (2 * Math.PI * k) / n;
        return [-125 + 0.003 * radius(k) * Math.cos(a), 36 + 0.003 * radius(k) * Math.sin(a)];
      });
      return { type: 'Polygon', coordinates: [[...ring, at(ring, 0, 'corner')]] };
    };
    for (const field of [outline((k) => 1 + 0.3 * Math.sin((12 * Math.PI * k) / n)), outline((k) => 1 + 0.01 * Math.sin(k * 12.9898))]) {
      const project = projector(field);
      const shape = jsts(field, project);
      const plan = walkPlan(field, { seed: 'petal', stops: 20 });
      expect(plan.edgeMarginM).toBe(10);
      for (const s of plan.stops) {
        const pt = jsts({ type: 'Point', coordinates: [s.lng!, s.lat!] }, project);
        expect(shape.contains(pt)).toBe(true);
        expect(shape.getBoundary().distance(pt)).toBeGreaterThanOrEqual(10);
      }
      for (const leg of plan.legs) expect(shape.getBoundary().distance(jsts({ type: 'LineString', coordinates: [leg.start!, leg.end!] }, project))).toBeGreaterThanOrEqual(10);
    }
  });

  it('a 30 x 30 m field: 10 m would leave 10 x 10 m (11 %, under a quarter), so 5 m (20 x 20 m, 44 %), said in the note', () => {
    const { field } = fixture('small');
    const project = projector(field);
    const shape = jsts(field, project);
    const plan = walkPlan(field, { seed: 'x' });
    expect(plan.edgeMarginM).toBe(5);
    expect(plan.edgeMarginAskedM).toBe(10);
    expect(plan.noteParts).toContainEqual({ code: 'margin_reduced', askedM: 10, usedM: 5 });
    expect(plan.note).toMatch(/too small for a 10 m edge margin, so 5 m/);
    for (const s of plan.stops) expect(shape.getBoundary().distance(jsts({ type: 'Point', coordinates: [s.lng!, s.lat!] }, project))).toBeGreaterThanOrEqual(5);
    // 3 m leaves 24 x 24 m (64 %): kept as asked.
    expect(walkPlan(field, { edgeMarginM: 3 }).edgeMarginM).toBe(3);
  });
});

describe('pattern and why', () => {
  it.each([
    ['strip', 'diagonal', 'convex', 1, 0],
    ['rectangle', 'diagonal', 'convex', 1, 0],
    // An L has one inner corner and two arms; a C two inner corners and three arms (hand count).
    ['ell', 'legs', 'concave', 2, 1],
    ['cee', 'legs', 'concave', 3, 2],
    ['hole', 'legs', 'holes', null, 0],
    ['two-part', 'legs', 'parts', 2, 0],
  ] as const)('%s: %s because %s', (name, pattern, reason, legs, reflex) => {
    const plan = walkPlan(fixture(name).field, { seed: 1 });
    expect(plan.pattern).toBe(pattern);
    expect(plan.reason.code).toBe(reason);
    expect(plan.reason.reflexCorners).toBe(reflex);
    if (legs !== null) expect(plan.legs).toHaveLength(legs);
    else expect(plan.legs.length).toBeGreaterThanOrEqual(3); // at least one leg each side of the pond
    expect(plan.noteParts[0]).toMatchObject({ code: 'pattern', pattern, reason });
  });

  it.each([
    // Hand-worked: the buffered rectangle is (W − 20) × (H − 20) m; its diagonal is the longest
    // straight line inside it. W and H are the fixture's side lengths measured with geographiclib.
    ['rectangle'],
    ['strip'],
  ])('%s: the diagonal of the rectangle 10 m inside the edges', (name) => {
    const { field } = fixture(name);
    const ring = at((field as Polygon).coordinates, 0, 'outer ring');
    const w = karney(at(ring, 0, 'corner'), at(ring, 1, 'corner'));
    const h = karney(at(ring, 1, 'corner'), at(ring, 2, 'corner'));
    const plan = walkPlan(field, { seed: 's' });
    // 0.2 m: the plan keeps 5 cm extra inside the margin.
    expect(Math.abs(plan.diagonalM - Math.hypot(w - 20, h - 20))).toBeLessThan(0.2);
    const inner = ((w - 20) * (h - 20)) / 10_000;
    expect(Math.abs(plan.walkableAreaHa - inner)).toBeLessThan(0.01 * inner);
  });
});

describe('each part of an L or a C gets its share of stops (within one stop of its share of area)', () => {
  // Both ways of cutting each shape at its inner corners are checked: the shares must hold for
  // either reading of "part". Areas from geographiclib's geodesic polygon area.
  it.each([['ell'], ['cee']])('%s', (name) => {
    const fx = fixture(name);
    const total = geodesicArea(fx.field as Polygon);
    for (const [cut, parts] of Object.entries(fx.parts)) {
      const sum = parts.reduce((s, p) => s + geodesicArea(p.geometry), 0);
      expect(sum / total).toBeCloseTo(1, 3); // the parts tile the field
      const project = projector(fx.field);
      // 1 cm of slack: a stop exactly on a cut line counts for both parts.
      const shaped = parts.map((p) => ({ ...p, shape: jsts(p.geometry, project).buffer(0.01) }));
      for (let seed = 1; seed <= 30; seed++) {
        for (const stops of [10, 17]) {
          const plan = walkPlan(fx.field, { seed, stops });
          shaped.forEach((p) => {
            const inside = plan.stops.filter((s) => p.shape.contains(jsts({ type: 'Point', coordinates: [s.lng!, s.lat!] }, project))).length;
            const expected = (stops * geodesicArea(p.geometry)) / total;
            expect(Math.abs(inside - expected), `${name} ${cut} ${p.label} seed ${seed} stops ${stops}`).toBeLessThanOrEqual(1);
          });
        }
      }
    }
  });
});

describe('distances against geodesics on WGS84 (geographiclib, Karney), within 0.5 %', () => {
  const within = (got: number, want: number) => expect(Math.abs(got - want)).toBeLessThanOrEqual(0.005 * want + 0.01);

  it.each(SHAPES)('%s: legs, transfers, stop distances along the route and the spacing', (name) => {
    const plan: WalkPlan = walkPlan(fixture(name).field, { seed: 'geo', stops: 15 });
    const routeBefore: number[] = [];
    let route = 0;
    plan.legs.forEach((leg, i) => {
      within(leg.lengthM, karney(leg.start!, leg.end!));
      const before = plan.legs[i - 1]; // none for the first leg
      if (before) {
        within(leg.transferM, karney(before.end!, leg.start!));
        route += karney(before.end!, leg.start!);
      }
      routeBefore.push(route);
      route += karney(leg.start!, leg.end!);
    });
    within(plan.walkLengthM, route);
    for (const s of plan.stops) {
      const leg = at(plan.legs, s.leg - 1, 'leg');
      within(s.legDistanceM, karney(leg.start!, [s.lng!, s.lat!]));
      within(s.distanceM, at(routeBefore, s.leg - 1, 'leg') + karney(leg.start!, [s.lng!, s.lat!]));
    }
    plan.stops.forEach((b, k) => {
      const a = plan.stops[k - 1]; // none for the first stop
      if (a && a.leg === b.leg) within(at(plan.legs, a.leg - 1, 'leg').spacingM, karney([a.lng!, a.lat!], [b.lng!, b.lat!]));
    });
  });

  it('systematic sampling on one diagonal: n stops one per n equal segments, at the same offset in each', () => {
    const plan = walkPlan(fixture('rectangle').field, { seed: 'sys', stops: 8 });
    const leg = only(plan.legs, 'leg');
    const segment = leg.lengthM / 8; // hand: line length / number of stops
    within(plan.spacingM, segment);
    const fromStart = plan.stops.map((s) => karney(leg.start!, [s.lng!, s.lat!]));
    const offset = at(fromStart, 0, 'stop');
    expect(offset).toBeLessThan(segment);
    fromStart.forEach((d, k) => within(d, offset + k * segment));
  });
});
