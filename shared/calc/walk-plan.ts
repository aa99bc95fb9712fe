import { along } from '@turf/along';
import { area as turfArea } from '@turf/area';
import { booleanPointInPolygon } from '@turf/boolean-point-in-polygon';
import { distance as turfDistance } from '@turf/distance';
import { lineString, point, polygon as turfPolygon } from '@turf/helpers';
import { lineIntersect } from '@turf/line-intersect';
import type { Feature, Polygon, Position } from 'geojson';
import { CalcError } from './errors';
import { M_PER_FT } from './units';
import { requireNonNegative } from './validate';

/** One walking step, about 0.76 m (2.5 ft): common practice, no published source. */
export const PACE_LENGTH_M = 0.76;
export const MAX_STOPS = 100;

export interface WalkStop {
  /** 1-based. */
  index: number;
  /** Along the walk, from the first stop. */
  distanceM: number;
  distanceFt: number;
  paces: number;
  /** WGS84 position when planned from a boundary; null when planned from the acreage alone. */
  lng: number | null;
  lat: number | null;
}

export interface WalkPlan {
  mode: 'boundary' | 'area';
  /** Full length of the chosen diagonal, edge to edge. */
  diagonalM: number;
  /** From the first stop to the last (the diagonal less the edge margin at each end). */
  walkLengthM: number;
  walkLengthFt: number;
  spacingM: number;
  spacingFt: number;
  spacingPaces: number;
  /** The margin actually kept from each edge (reduced on a very small field; see note). */
  edgeMarginM: number;
  /** Ends of the walking line (edge margin applied), [lng, lat]; null without a boundary. */
  start: Position | null;
  end: Position | null;
  stops: WalkStop[];
  areaHa: number;
  paceLengthM: number;
  note: string;
}

export interface WalkPlanOptions {
  stops?: number;
  /** Needed when there is no boundary. */
  areaHa?: number;
  edgeMarginM?: number;
}

function bad(message: string): never {
  throw new CalcError('bad_boundary', message, 'boundary');
}

function validPolygon(boundary: unknown): Polygon {
  let g = boundary as { type?: unknown; coordinates?: unknown; geometry?: unknown };
  if (g && typeof g === 'object' && g.type === 'Feature') g = g.geometry as typeof g;
  if (!g || typeof g !== 'object' || g.type !== 'Polygon' || !Array.isArray(g.coordinates) || g.coordinates.length === 0) {
    bad('The field boundary must be a GeoJSON Polygon.');
  }
  const rings = g.coordinates as unknown[];
  rings.forEach((ring, r) => {
    if (!Array.isArray(ring) || ring.length < 4) bad(`Boundary ring ${r + 1} needs at least 4 positions (a closed triangle).`);
    for (const pos of ring as unknown[]) {
      const ok =
        Array.isArray(pos) && pos.length >= 2 &&
        typeof pos[0] === 'number' && Number.isFinite(pos[0]) && Math.abs(pos[0]) <= 180 &&
        typeof pos[1] === 'number' && Number.isFinite(pos[1]) && Math.abs(pos[1]) <= 90;
      if (!ok) bad('Every boundary position must be [longitude, latitude] in degrees.');
    }
    const first = (ring as number[][])[0];
    const last = (ring as number[][])[(ring as number[][]).length - 1];
    if (first[0] !== last[0] || first[1] !== last[1]) bad(`Boundary ring ${r + 1} is not closed (its last position must repeat the first).`);
  });
  const outer = (rings[0] as number[][]).slice(0, -1);
  const distinct = new Set(outer.map((p) => `${p[0]},${p[1]}`));
  if (distinct.size < 3) bad('The field boundary needs at least 3 distinct corners.');
  return g as unknown as Polygon;
}

function samePos(a: Position, b: Position): boolean {
  return Math.abs(a[0] - b[0]) < 1e-10 && Math.abs(a[1] - b[1]) < 1e-10;
}

/** True when the open segment a–b runs through the polygon's interior only. */
function segmentInside(poly: Feature<Polygon>, a: Position, b: Position): boolean {
  for (const f of [0.25, 0.5, 0.75]) {
    const p = [a[0] + (b[0] - a[0]) * f, a[1] + (b[1] - a[1]) * f];
    if (!booleanPointInPolygon(point(p), poly, { ignoreBoundary: true })) return false;
  }
  const hits = lineIntersect(lineString([a, b]), poly).features;
  return hits.every((h) => samePos(h.geometry.coordinates, a) || samePos(h.geometry.coordinates, b));
}

/**
 * The longest segment between two boundary corners that stays inside the field; if there is none
 * (a triangle has no diagonals), the longest from a corner to the midpoint of a side it does not touch.
 */
function longestInsideDiagonal(poly: Polygon): [Position, Position] {
  const feature = turfPolygon(poly.coordinates);
  const ring = poly.coordinates[0].slice(0, -1);
  const k = ring.length;
  // Rank by a local flat-earth length (fields are small), then test from the longest down.
  const lat0 = (ring.reduce((s, p) => s + p[1], 0) / k) * (Math.PI / 180);
  const cosLat = Math.cos(lat0);
  const len2 = (a: Position, b: Position) => ((a[0] - b[0]) * cosLat) ** 2 + (a[1] - b[1]) ** 2;
  const pairs: Array<[Position, Position, number]> = [];
  for (let i = 0; i < k; i++) {
    for (let j = i + 2; j < k; j++) {
      if (i === 0 && j === k - 1) continue; // adjacent across the ring's seam
      if (samePos(ring[i], ring[j])) continue;
      pairs.push([ring[i], ring[j], len2(ring[i], ring[j])]);
    }
  }
  pairs.sort((p, q) => q[2] - p[2]);
  for (const [a, b] of pairs) if (segmentInside(feature, a, b)) return [a, b];
  const mids: Array<[Position, Position, number]> = [];
  for (let i = 0; i < k; i++) {
    for (let e = 0; e < k; e++) {
      const e2 = (e + 1) % k;
      if (e === i || e2 === i) continue;
      const mid = [(ring[e][0] + ring[e2][0]) / 2, (ring[e][1] + ring[e2][1]) / 2];
      mids.push([ring[i], mid, len2(ring[i], mid)]);
    }
  }
  mids.sort((p, q) => q[2] - p[2]);
  for (const [a, b] of mids) if (segmentInside(feature, a, b)) return [a, b];
  return bad('No straight walking line fits inside this boundary; check that it is a simple (non-crossing) outline.');
}

/** Margin actually usable: the requested one, unless it would leave less than 20 % of the diagonal. */
function usableMargin(diagonalM: number, requested: number): { margin: number; reduced: boolean } {
  const cap = 0.4 * diagonalM;
  return requested > cap ? { margin: cap, reduced: true } : { margin: requested, reduced: false };
}

function stopDistances(walkLengthM: number, stops: number): number[] {
  if (stops === 1) return [walkLengthM / 2];
  return Array.from({ length: stops }, (_, k) => (walkLengthM * k) / (stops - 1));
}

/**
 * A field walk plan: a straight line across the field along its longest inside diagonal, kept
 * `edgeMarginM` from the edges (edge rows are not typical of the field), with `stops` evenly spaced
 * stops from one end to the other. Without a boundary, the field is taken as a square of the given
 * area and the plan is in metres and paces along its diagonal.
 */
export function walkPlan(boundary: Polygon | Feature<Polygon> | null, options: WalkPlanOptions = {}): WalkPlan {
  const stops = options.stops ?? 10;
  if (!Number.isInteger(stops) || stops < 1 || stops > MAX_STOPS) {
    throw new CalcError('bad_option', `The number of stops must be a whole number from 1 to ${MAX_STOPS}.`, 'stops');
  }
  const requestedMargin = requireNonNegative(options.edgeMarginM ?? 10, 'edgeMarginM');

  let diagonalM: number;
  let areaHa: number;
  let a: Position | null = null;
  let b: Position | null = null;
  if (boundary === null || boundary === undefined) {
    const ah = options.areaHa;
    if (ah === undefined || ah === null) {
      throw new CalcError('missing_area', 'Without a field boundary, the field area is needed to plan the walk.', 'areaHa');
    }
    if (typeof ah !== 'number' || !Number.isFinite(ah) || ah <= 0) {
      throw new CalcError('non_positive', 'The field area must be a number greater than zero.', 'areaHa');
    }
    areaHa = ah;
    diagonalM = Math.sqrt(areaHa * 10_000) * Math.SQRT2;
  } else {
    const poly = validPolygon(boundary);
    [a, b] = longestInsideDiagonal(poly);
    diagonalM = turfDistance(point(a), point(b), { units: 'meters' });
    areaHa = turfArea(poly) / 10_000;
    if (!(diagonalM >= 1)) throw new CalcError('boundary_too_small', 'The field boundary is too small to walk (under 1 m across).', 'boundary');
  }

  const { margin, reduced } = usableMargin(diagonalM, requestedMargin);
  const walkLengthM = diagonalM - 2 * margin;
  const spacingM = stops === 1 ? 0 : walkLengthM / (stops - 1);
  const line = a && b ? lineString([a, b]) : null;
  const stopList: WalkStop[] = stopDistances(walkLengthM, stops).map((d, k) => {
    let lng: number | null = null;
    let lat: number | null = null;
    if (line) {
      const c = along(line, margin + d, { units: 'meters' }).geometry.coordinates;
      lng = c[0];
      lat = c[1];
    }
    return { index: k + 1, distanceM: d, distanceFt: d / M_PER_FT, paces: d / PACE_LENGTH_M, lng, lat };
  });

  const notes: string[] = [];
  notes.push(
    boundary
      ? `Walk the longest straight line across the field, starting ${Math.round(margin)} m in from the edge; dig one plant at each of the ${stops} stops.`
      : `No boundary on file: plan assumes a square field of ${areaHa.toFixed(2)} ha and walks its diagonal from ${Math.round(margin)} m inside a corner; dig one plant at each of the ${stops} stops.`,
  );
  if (reduced) notes.push(`The field is small, so the edge margin was reduced to ${margin.toFixed(1)} m.`);
  notes.push(`Paces assume a ${PACE_LENGTH_M} m step (common practice).`);

  return {
    mode: boundary ? 'boundary' : 'area',
    diagonalM,
    walkLengthM,
    walkLengthFt: walkLengthM / M_PER_FT,
    spacingM,
    spacingFt: spacingM / M_PER_FT,
    spacingPaces: spacingM / PACE_LENGTH_M,
    edgeMarginM: margin,
    start: line ? along(line, margin, { units: 'meters' }).geometry.coordinates : null,
    end: line ? along(line, margin + walkLengthM, { units: 'meters' }).geometry.coordinates : null,
    stops: stopList,
    areaHa,
    paceLengthM: PACE_LENGTH_M,
    note: notes.join(' '),
  };
}
