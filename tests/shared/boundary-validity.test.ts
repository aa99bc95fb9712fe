import { readFileSync, readdirSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { Position } from 'geojson';
import GeometryFactory from 'jsts/org/locationtech/jts/geom/GeometryFactory.js';
import GeoJSONReader from 'jsts/org/locationtech/jts/io/GeoJSONReader.js';
import 'jsts/org/locationtech/jts/monkey.js';
import { describe, expect, it } from 'vitest';
import { type Boundary, type BoundaryProblem, boundaryProblemText, checkBoundary } from '../../shared/registry/boundary';

// Invented outlines in the open sea near 36° N, 125° W (no real place). Expected answers are drawn
// by hand (a figure-of-eight crosses itself once, where its two diagonals meet) and, for the
// shipped fixtures, cross-checked with JSTS's isValid, a library the check does not use.

const X0 = -125;
const Y0 = 36;
const D = 0.001; // about 90 m east-west, 111 m north-south
const sq = (x: number, y: number, s = 1): Position[] => [
  [X0 + x * D, Y0 + y * D],
  [X0 + (x + s) * D, Y0 + y * D],
  [X0 + (x + s) * D, Y0 + (y + s) * D],
  [X0 + x * D, Y0 + (y + s) * D],
  [X0 + x * D, Y0 + y * D],
];
/** Corners given in steps of D from (X0, Y0). */
const grid = (corners: [number, number][]): Position[] => corners.map(([x, y]) => [X0 + x * D, Y0 + y * D]);
const poly = (...rings: Position[][]): Boundary => ({ type: 'Polygon', coordinates: rings });
const problem = (b: Boundary, limits?: Parameters<typeof checkBoundary>[1]) => {
  const r = checkBoundary(b, limits);
  return r.ok ? null : r.problem;
};

describe('checkBoundary', () => {
  it('a square, an L, a square with a hole and two separate squares are accepted', () => {
    expect(problem(poly(sq(0, 0)))).toBeNull();
    const ell = grid([[0, 0], [3, 0], [3, 1], [1, 1], [1, 3], [0, 3], [0, 0]]);
    expect(problem(poly(ell))).toBeNull();
    expect(problem(poly(sq(0, 0, 3), sq(1, 1)))).toBeNull();
    expect(problem({ type: 'MultiPolygon', coordinates: [[sq(0, 0)], [sq(2, 2)]] })).toBeNull();
  });

  it('a figure-of-eight crosses itself once, where its diagonals meet (hand-worked: the middle of the square)', () => {
    const bow = grid([[0, 0], [1, 1], [1, 0], [0, 1], [0, 0]]);
    const p = problem(poly(bow));
    expect(p).toMatchObject({ code: 'self_intersection', crossings: 1 });
    const q = p as Extract<BoundaryProblem, { code: 'self_intersection' }>;
    expect(q.lng).toBeCloseTo(X0 + 0.5 * D, 9);
    expect(q.lat).toBeCloseTo(Y0 + 0.5 * D, 9);
  });

  it('a hole that cuts its field’s edge is a crossing; a hole wholly outside is named as such', () => {
    expect(problem(poly(sq(0, 0, 2), sq(1, 1, 2)))?.code).toBe('self_intersection');
    expect(problem(poly(sq(0, 0), sq(3, 3)))).toEqual({ code: 'hole_outside', part: 1, hole: 1 });
  });

  it('two parts that overlap are refused', () => {
    expect(problem({ type: 'MultiPolygon', coordinates: [[sq(0, 0, 2)], [sq(1, 1, 2)]] })?.code).toMatch(/^(invalid|self_intersection)$/);
  });

  it('corners on one line enclose no area; two distinct corners are too few', () => {
    const flat = grid([[0, 0], [1, 0], [2, 0], [0, 0]]);
    expect(problem(poly(flat))).toMatchObject({ code: 'no_area', part: 1 });
    const two = grid([[0, 0], [1, 0], [0, 0], [0, 0]]);
    expect(problem(poly(two))).toEqual({ code: 'too_few_corners', part: 1, ring: 1, corners: 2 });
  });

  it('bounds the corners (5,000 by default) and the parts (50 by default)', () => {
    // A 5,001-corner circle: 5,002 positions with the closing repeat.
    const circle = (n: number) =>
      Array.from({ length: n + 1 }, (_, k) => [X0 + D * Math.cos((2 * Math.PI * (k % n)) / n), Y0 + D * Math.sin((2 * Math.PI * (k % n)) / n)]);
    expect(problem(poly(circle(5000)))).toBeNull();
    expect(problem(poly(circle(5001)))).toEqual({ code: 'too_many_vertices', vertices: 5001, maxVertices: 5000 });
    expect(problem(poly(circle(100)), { maxVertices: 99 })).toEqual({ code: 'too_many_vertices', vertices: 100, maxVertices: 99 });
    const many = (n: number): Boundary => ({ type: 'MultiPolygon', coordinates: Array.from({ length: n }, (_, k) => [sq(2 * k, 0)]) });
    expect(problem(many(50))).toBeNull();
    expect(problem(many(51))).toEqual({ code: 'too_many_parts', parts: 51, maxParts: 50 });
  });

  it('agrees with JSTS isValid on every shipped walk-plan fixture and on the refused shapes above', () => {
    const reader = new GeoJSONReader(new GeometryFactory());
    const dir = join(dirname(fileURLToPath(import.meta.url)), '..', 'fixtures', 'boundaries');
    const shapes: Boundary[] = readdirSync(dir)
      .filter((f) => f.endsWith('.geojson'))
      .map((f) => JSON.parse(readFileSync(join(dir, f), 'utf8')).features[0].geometry);
    shapes.push(poly(grid([[0, 0], [1, 1], [1, 0], [0, 1], [0, 0]])));
    shapes.push(poly(sq(0, 0, 2), sq(1, 1, 2)));
    shapes.push({ type: 'MultiPolygon', coordinates: [[sq(0, 0, 2)], [sq(1, 1, 2)]] });
    expect(shapes.length).toBeGreaterThanOrEqual(10);
    for (const s of shapes) expect(checkBoundary(s).ok, JSON.stringify(s).slice(0, 80)).toBe(reader.read(s).isValid());
  });
});

describe('boundaryProblemText: plain words with the numbers, never the code', () => {
  it.each<[BoundaryProblem, RegExp]>([
    [{ code: 'too_many_parts', parts: 51, maxParts: 50 }, /51 separate parts; at most 50/],
    [{ code: 'too_many_vertices', vertices: 12345, maxVertices: 5000 }, /12,345 corners; at most 5,000/],
    [{ code: 'too_few_corners', part: 2, ring: 1, corners: 2 }, /Part 2 .* only 2 different corners/],
    [{ code: 'no_area', part: 1, areaM2: 0 }, /encloses no area/],
    [{ code: 'self_intersection', crossings: 1, lng: -125.0005, lat: 36.0005 }, /crosses itself \(once, first near 36\.00050, -125\.00050\)/],
    [{ code: 'self_intersection', crossings: 3, lng: -125, lat: 36 }, /3 times/],
    [{ code: 'hole_outside', part: 1, hole: 2 }, /Hole 2 of part 1 lies outside/],
    [{ code: 'invalid' }, /parts overlap/],
  ])('%o', (p, text) => {
    const words = boundaryProblemText(p);
    expect(words).toMatch(text);
    expect(words).not.toContain(p.code);
  });
});
