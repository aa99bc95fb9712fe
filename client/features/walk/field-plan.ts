import { booleanPointInPolygon } from '@turf/boolean-point-in-polygon';
import { distance } from '@turf/distance';
import type { MultiPolygon, Polygon } from 'geojson';
import type { Boundary } from '../../../shared/registry/boundary';
import { fieldWalkPlan, type WalkPlan } from '../../../shared/calc/walk-plan';
import { lonLatOf } from '../../../shared/geo/plane';

export interface PlanResult {
  plan: WalkPlan;
  /** The outline walked (every part of a multi-part field), or null when planned from the area. */
  shape: Polygon | MultiPolygon | null;
  /** The boundary on file could not be walked, so the area was used. */
  boundaryProblem: boolean;
}

/**
 * The walk plan of a field: every part of its outline, stops at least the rule's edge margin from
 * every edge, drawn from `seed` (kept with the walk) so the same seed gives the same stops.
 */
export function planField(
  boundary: Boundary | null,
  areaHa: number,
  stops: number,
  options: { edgeMarginM: number; seed?: string },
): PlanResult {
  const { plan, boundaryProblem } = fieldWalkPlan(boundary, areaHa, stops, options);
  return { plan, shape: plan.mode === 'boundary' ? boundary : null, boundaryProblem };
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
  if (result.shape) {
    if (booleanPointInPolygon([here.lon, here.lat], result.shape)) return 0;
    const parts = result.shape.type === 'Polygon' ? [result.shape.coordinates] : result.shape.coordinates;
    for (const part of parts) for (const p of part[0] ?? []) points.push(lonLatOf(p));
  }
  for (const s of result.plan.stops) if (s.lat !== null && s.lng !== null) points.push([s.lng, s.lat]);
  if (points.length === 0) return null;
  return Math.min(...points.map(([lon, lat]) => distanceM(here.lat, here.lon, lat, lon)));
}
