import geodesic from 'geographiclib-geodesic';
import type { Polygon, Position } from 'geojson';
import GeometryFactory from 'jsts/org/locationtech/jts/geom/GeometryFactory.js';
import GeoJSONReader from 'jsts/org/locationtech/jts/io/GeoJSONReader.js';
import DouglasPeuckerSimplifier from 'jsts/org/locationtech/jts/simplify/DouglasPeuckerSimplifier.js';
import 'jsts/org/locationtech/jts/monkey.js';
import { describe, expect, it } from 'vitest';
import { TRACE_SIMPLIFY_M, closingGapM, keepFix, tracedLengthM, tracedOutline, type TracePoint } from '../../shared/registry/trace';
import { mulberry32, normal } from './prng';

// A boundary traced by walking the edge (shared/registry/trace.ts), checked against libraries it
// does not use: geographiclib (Karney's geodesics on WGS84) to lay out the walk and measure areas,
// and JSTS (distances, and its own Douglas-Peucker simplifier) on azimuthal equidistant coordinates.
// Invented places in the open sea near 36.2° N, 134.9° W.

const G = geodesic.Geodesic.WGS84;
const LAT0 = 36.2;
const LON0 = -134.9;

/** The position x metres east and y metres north of the origin, by geodesics (geographiclib Direct). */
function at(x: number, y: number): { lat: number; lon: number } {
  const s = Math.hypot(x, y);
  if (s === 0) return { lat: LAT0, lon: LON0 };
  const azi = (Math.atan2(x, y) * 180) / Math.PI;
  const r = G.Direct(LAT0, LON0, azi, s);
  return { lat: r.lat2!, lon: r.lon2! };
}
/** Metres east and north of the origin (azimuthal equidistant, geographiclib Inverse). */
function project(p: Position): number[] {
  const r = G.Inverse(LAT0, LON0, p[1]!, p[0]!);
  const a = (r.azi1! * Math.PI) / 180;
  return [r.s12! * Math.sin(a), r.s12! * Math.cos(a)];
}
const reader = new GeoJSONReader(new GeometryFactory());
const jsts = (g: { type: string; coordinates: unknown }) => {
  const map = (c: unknown): unknown => (typeof (c as number[])[0] === 'number' ? project(c as Position) : (c as unknown[]).map(map));
  return reader.read({ type: g.type, coordinates: map(g.coordinates) });
};
function geodesicAreaHa(p: Polygon): number {
  const poly = G.Polygon(false);
  for (const [lon, lat] of p.coordinates[0]!.slice(0, -1)) poly.AddPoint(lat!, lon!);
  return Math.abs(poly.Compute(false, true).area!) / 10_000;
}

/** Walks a closed path of corners (metres) with a fix every metre, GPS scatter of `sd` m, each fix kept or not as the phone would. */
function walk(corners: Array<[number, number]>, sd: number, seed = 7, accuracyM = 4): { kept: TracePoint[]; all: TracePoint[] } {
  const rand = mulberry32(seed);
  const all: TracePoint[] = [];
  for (let i = 0; i < corners.length; i++) {
    const [ax, ay] = corners[i]!;
    const [bx, by] = corners[(i + 1) % corners.length]!;
    const n = Math.max(1, Math.round(Math.hypot(bx - ax, by - ay)));
    for (let k = 0; k < n; k++) {
      const t = k / n;
      const p = at(ax + t * (bx - ax) + sd * normal(rand), ay + t * (by - ay) + sd * normal(rand));
      all.push({ ...p, accuracyM });
    }
  }
  const kept: TracePoint[] = [];
  for (const p of all) if (keepFix(kept[kept.length - 1] ?? null, p)) kept.push(p);
  return { kept, all };
}

describe('recording positions', () => {
  it('keeps a fix a step (3 m) from the last one kept and accurate to 20 m; leaves out the rest', () => {
    const a = { ...at(0, 0), accuracyM: 5 };
    expect(keepFix(null, a)).toBe(true);
    expect(keepFix(a, { ...at(2, 0), accuracyM: 5 })).toBe(false);
    expect(keepFix(a, { ...at(3.1, 0), accuracyM: 5 })).toBe(true);
    expect(keepFix(a, { ...at(30, 0), accuracyM: 35 })).toBe(false);
    expect(keepFix(null, { ...a, accuracyM: Number.NaN })).toBe(false);
  });

  it('a 100 × 60 m rectangle walked once: about 320 m walked (hand-worked: 2·(100+60)), the gap to the start a few metres', () => {
    const { kept } = walk([[0, 0], [100, 0], [100, 60], [0, 60]], 0);
    // A fix every metre, one kept every 3 to 4 m: 80 to 107 positions.
    expect(kept.length).toBeGreaterThanOrEqual(80);
    expect(kept.length).toBeLessThanOrEqual(107);
    // The path walked plus the gap back to the start is the perimeter, less a little cut at each corner.
    expect(tracedLengthM(kept) + closingGapM(kept)).toBeGreaterThan(316);
    expect(tracedLengthM(kept) + closingGapM(kept)).toBeLessThan(320.5);
    expect(closingGapM(kept)).toBeLessThan(4);
  });
});

describe('the outline', () => {
  it('a rectangle walked with 0.5 m GPS scatter: a handful of corners, every position within the tolerance, the area within 3 % of 0.6 ha', () => {
    const { kept } = walk([[0, 0], [100, 0], [100, 60], [0, 60]], 0.5);
    const out = tracedOutline(kept);
    if (!out.ok) throw new Error(JSON.stringify(out));
    expect(out.corners).toBeGreaterThanOrEqual(4);
    expect(out.corners).toBeLessThan(20);
    expect(out.pointsRecorded).toBe(kept.length);
    expect(out.medianAccuracyM).toBe(4);
    // 100 m × 60 m = 0.6 ha (hand-worked); the outline's geodesic area by geographiclib, and the app's own (turf).
    expect(Math.abs(geodesicAreaHa(out.boundary) - 0.6) / 0.6).toBeLessThan(0.03);
    expect(Math.abs(out.areaHa - geodesicAreaHa(out.boundary)) / geodesicAreaHa(out.boundary)).toBeLessThan(0.005);
    // Every kept position within the simplification tolerance of the outline (JSTS distance).
    const edge = jsts(out.boundary).getBoundary();
    for (const p of kept) expect(edge.distance(jsts({ type: 'Point', coordinates: [p.lon, p.lat] }))).toBeLessThanOrEqual(TRACE_SIMPLIFY_M + 0.01);
  });

  it('agrees with JSTS’s own Douglas-Peucker simplifier on an L-shaped field: areas within 1 %', () => {
    const { kept } = walk([[0, 0], [150, 0], [150, 50], [60, 50], [60, 120], [0, 120]], 0.7, 11);
    const out = tracedOutline(kept);
    if (!out.ok) throw new Error(JSON.stringify(out));
    const raw: Polygon = { type: 'Polygon', coordinates: [[...kept.map((p) => [p.lon, p.lat]), [kept[0]!.lon, kept[0]!.lat]]] };
    const theirs = DouglasPeuckerSimplifier.simplify(jsts(raw), TRACE_SIMPLIFY_M);
    const mine = jsts(out.boundary);
    expect(Math.abs(mine.getArea() - theirs.getArea()) / theirs.getArea()).toBeLessThan(0.01);
    // 150·50 + 60·70 = 11,700 m² (hand-worked) within 3 %.
    expect(Math.abs(mine.getArea() - 11_700) / 11_700).toBeLessThan(0.03);
  });

  it('refuses too few positions, a walk there and back (no area) and a figure of eight (crossing) with the problem', () => {
    expect(tracedOutline([])).toEqual({ ok: false, problem: 'too_few_points' });
    const { kept: line } = walk([[0, 0], [80, 0]], 0);
    expect(tracedOutline(line).ok).toBe(false);
    const { kept: eight } = walk([[0, 0], [60, 60], [60, 0], [0, 60]], 0);
    const out = tracedOutline(eight);
    expect(out.ok).toBe(false);
    if (!out.ok) expect(out.detail?.code).toBe('self_intersection');
  });
});
