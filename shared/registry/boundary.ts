import { area as turfArea } from '@turf/area';
import { booleanPointInPolygon } from '@turf/boolean-point-in-polygon';
import { booleanValid } from '@turf/boolean-valid';
import { kinks } from '@turf/kinks';
import { z } from 'zod';
import { formatNumber } from '../format/figures';

/**
 * A field boundary: a GeoJSON Polygon or MultiPolygon in WGS84 longitude/latitude (RFC 7946).
 * Checked enough that area and walk-plan computations cannot be fed nonsense.
 */
const position = z
  .array(z.number().finite())
  .min(2, 'A position needs longitude and latitude.')
  .max(3)
  .refine(([lon, lat]) => lon !== undefined && lat !== undefined && lon >= -180 && lon <= 180 && lat >= -90 && lat <= 90, 'Longitude must be within ±180 and latitude within ±90.');

const ring = z
  .array(position)
  .min(4, 'A ring needs at least four positions (the first repeated at the end).')
  .max(20_000)
  .refine((r) => r[0]![0] === r[r.length - 1]![0] && r[0]![1] === r[r.length - 1]![1], 'A ring must end where it starts.');

const polygonCoordinates = z.array(ring).min(1, 'A polygon needs an outer ring.');

export const polygonSchema = z.object({ type: z.literal('Polygon'), coordinates: polygonCoordinates });
export const multiPolygonSchema = z.object({ type: z.literal('MultiPolygon'), coordinates: z.array(polygonCoordinates).min(1) });

export const boundarySchema = z.discriminatedUnion('type', [polygonSchema, multiPolygonSchema], {
  message: 'The boundary must be a GeoJSON Polygon or MultiPolygon.',
});
export type Boundary = z.infer<typeof boundarySchema>;

/**
 * Accepts what people upload: a bare geometry, a Feature, or a FeatureCollection holding one
 * polygon feature. Returns the geometry or a plain-words problem.
 */
export function boundaryFromGeoJson(input: unknown): { ok: true; boundary: Boundary } | { ok: false; problem: string } {
  let geometry = input as { type?: string; geometry?: unknown; features?: { geometry?: unknown }[] } | null;
  if (geometry?.type === 'FeatureCollection') {
    const features = (geometry.features ?? []).filter((f) => f && f.geometry);
    if (features.length !== 1) return { ok: false, problem: `The file holds ${features.length} shapes; upload one field at a time.` };
    geometry = features[0]!.geometry as typeof geometry;
  } else if (geometry?.type === 'Feature') {
    geometry = geometry.geometry as typeof geometry;
  }
  const parsed = boundarySchema.safeParse(geometry);
  if (!parsed.success) return { ok: false, problem: parsed.error.issues[0]?.message ?? 'Not a GeoJSON polygon.' };
  const valid = checkBoundary(parsed.data);
  if (!valid.ok) return { ok: false, problem: boundaryProblemText(valid.problem) };
  return { ok: true, boundary: parsed.data };
}

// ---------------------------------------------------------------------------------------------
// Validity: what the schema cannot see (crossing edges, holes outside their field, overlapping
// parts) and bounds that keep the walk plan and the office map fast.


export const MAX_BOUNDARY_VERTICES = 5_000;
export const MAX_BOUNDARY_PARTS = 50;

/** A machine code and the numbers a plain-words message needs (`boundaryProblemText` words it in English). */
export type BoundaryProblem =
  | { code: 'too_many_parts'; parts: number; maxParts: number }
  | { code: 'too_many_vertices'; vertices: number; maxVertices: number }
  | { code: 'too_few_corners'; part: number; ring: number; corners: number }
  | { code: 'no_area'; part: number; areaM2: number }
  | { code: 'self_intersection'; crossings: number; lng: number; lat: number }
  | { code: 'hole_outside'; part: number; hole: number }
  | { code: 'invalid' };

export interface BoundaryLimits {
  maxVertices?: number;
  maxParts?: number;
}

/**
 * Refuses a boundary that the walk plan and the area could not trust: too many parts or corners,
 * a ring with fewer than 3 corners or no area, edges that cross (a figure-of-eight, a hole cutting
 * its field's edge), a hole outside its field, or parts that overlap.
 */
export function checkBoundary(boundary: Boundary, limits: BoundaryLimits = {}): { ok: true } | { ok: false; problem: BoundaryProblem } {
  const maxVertices = limits.maxVertices ?? MAX_BOUNDARY_VERTICES;
  const maxParts = limits.maxParts ?? MAX_BOUNDARY_PARTS;
  const parts = boundary.type === 'Polygon' ? [boundary.coordinates] : boundary.coordinates;
  const fail = (problem: BoundaryProblem) => ({ ok: false as const, problem });
  if (parts.length > maxParts) return fail({ code: 'too_many_parts', parts: parts.length, maxParts });
  // Each ring repeats its first position at the end; that copy is not a corner.
  const vertices = parts.reduce((s, part) => s + part.reduce((t, ring) => t + ring.length - 1, 0), 0);
  if (vertices > maxVertices) return fail({ code: 'too_many_vertices', vertices, maxVertices });
  for (let p = 0; p < parts.length; p++) {
    for (let r = 0; r < parts[p]!.length; r++) {
      const corners = new Set(parts[p]![r]!.slice(0, -1).map(([x, y]) => `${x},${y}`)).size;
      if (corners < 3) return fail({ code: 'too_few_corners', part: p + 1, ring: r + 1, corners });
    }
  }
  const crossings = kinks(boundary).features;
  if (crossings.length > 0) {
    const [lng = NaN, lat = NaN] = crossings[0]!.geometry.coordinates;
    return fail({ code: 'self_intersection', crossings: crossings.length, lng, lat });
  }
  // After the crossing check: a figure-of-eight's two loops cancel out to no area.
  for (let p = 0; p < parts.length; p++) {
    const areaM2 = turfArea({ type: 'Polygon', coordinates: [parts[p]![0]!] });
    if (areaM2 < 1) return fail({ code: 'no_area', part: p + 1, areaM2 });
  }
  for (let p = 0; p < parts.length; p++) {
    const shell = { type: 'Polygon' as const, coordinates: [parts[p]![0]!] };
    for (let h = 1; h < parts[p]!.length; h++) {
      // No edges cross (checked above), so a hole is wholly inside or wholly outside.
      if (!parts[p]![h]!.every((pos) => booleanPointInPolygon(pos, shell))) return fail({ code: 'hole_outside', part: p + 1, hole: h });
    }
  }
  if (!booleanValid(boundary)) return fail({ code: 'invalid' });
  return { ok: true };
}

/** The problem in plain English words (the office is English). */
export function boundaryProblemText(problem: BoundaryProblem): string {
  switch (problem.code) {
    case 'too_many_parts':
      return `The boundary has ${formatNumber(problem.parts)} separate parts; at most ${problem.maxParts} are accepted. Upload one field at a time.`;
    case 'too_many_vertices':
      return `The boundary has ${formatNumber(problem.vertices)} corners; at most ${formatNumber(problem.maxVertices)} are accepted. Simplify the outline and upload it again.`;
    case 'too_few_corners':
      return `Part ${problem.part} of the boundary has a ring with only ${problem.corners} different corners; a field outline needs at least 3.`;
    case 'no_area':
      return `Part ${problem.part} of the boundary encloses no area (its corners lie on one line or on top of each other).`;
    case 'self_intersection':
      return `The outline crosses itself (${problem.crossings === 1 ? 'once' : `${problem.crossings} times`}, first near ${problem.lat.toFixed(5)}, ${problem.lng.toFixed(5)}). Redraw it so that no edges cross.`;
    case 'hole_outside':
      return `Hole ${problem.hole} of part ${problem.part} lies outside that part of the field.`;
    default:
      return 'The outline is not a valid field shape: parts overlap or touch along an edge. Redraw it with separate parts.';
  }
}

/** The boundary schema with the validity check: what every input schema with a boundary uses. */
export const checkedBoundarySchema = boundarySchema.superRefine((b, ctx) => {
  const valid = checkBoundary(b);
  if (!valid.ok) ctx.addIssue({ code: 'custom', message: boundaryProblemText(valid.problem) });
});
