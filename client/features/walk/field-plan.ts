import { area } from '@turf/area';
import { booleanPointInPolygon } from '@turf/boolean-point-in-polygon';
import { distance } from '@turf/distance';
import type { Polygon } from 'geojson';
import type { Boundary } from '../../../shared/registry/boundary';
import { walkPlan, type WalkPlan } from '../../../shared/calc/walk-plan';

export interface PlanResult {
  plan: WalkPlan;
  /** The polygon walked (the largest part of a MultiPolygon), or null when planned from the area. */
  polygon: Polygon | null;
  /** The boundary on file could not be walked straight, so the area was used. */
  boundaryProblem: boolean;
}

/** walkPlan takes one Polygon: for a field in several parts, walk the largest. */
export function walkedPolygon(boundary: Boundary | null): Polygon | null {
  if (!boundary) return null;
  if (boundary.type === 'Polygon') return boundary;
  let best: Polygon | null = null;
  let bestArea = -1;
  for (const coordinates of boundary.coordinates) {
    const p: Polygon = { type: 'Polygon', coordinates };
    const a = area(p);
    if (a > bestArea) {
      best = p;
      bestArea = a;
    }
  }
  return best;
}

export function planField(boundary: Boundary | null, areaHa: number, stops: number): PlanResult {
  const polygon = walkedPolygon(boundary);
  if (polygon) {
    try {
      return { plan: walkPlan(polygon, { stops, areaHa }), polygon, boundaryProblem: false };
    } catch {
      // a self-crossing or degenerate outline: fall back to the area below
    }
  }
  return { plan: walkPlan(null, { stops, areaHa }), polygon: null, boundaryProblem: polygon !== null };
}

/** Great-circle distance in metres between two positions (turf: haversine on the mean Earth radius). */
export function distanceM(lat1: number, lon1: number, lat2: number, lon2: number): number {
  return distance([lon1, lat1], [lon2, lat2], { units: 'meters' });
}

/** Beyond this the sampler is not at the field yet: a map dot and stop distances would only mislead. */
export const FAR_FROM_FIELD_M = 400;

/**
 * How far the sampler is from the field: 0 inside its outline, else the distance to the nearest
 * corner of the outline or planned stop (close enough to the edge at these distances). Null when
 * the field has no position (planned from its area only).
 */
export function distanceToFieldM(result: PlanResult, here: { lat: number; lon: number }): number | null {
  const points: Array<[number, number]> = [];
  if (result.polygon) {
    if (booleanPointInPolygon([here.lon, here.lat], result.polygon)) return 0;
    for (const [lon, lat] of result.polygon.coordinates[0]) points.push([lon, lat]);
  }
  for (const s of result.plan.stops) if (s.lat !== null && s.lng !== null) points.push([s.lng, s.lat]);
  if (points.length === 0) return null;
  return Math.min(...points.map(([lon, lat]) => distanceM(here.lat, here.lon, lat, lon)));
}
