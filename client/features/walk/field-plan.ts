import { area } from '@turf/area';
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

/** Great-circle distance in metres (haversine; plenty at field scale). */
export function distanceM(lat1: number, lon1: number, lat2: number, lon2: number): number {
  const R = 6_371_008.8; // mean Earth radius (IUGG)
  const rad = Math.PI / 180;
  const dLat = (lat2 - lat1) * rad;
  const dLon = (lon2 - lon1) * rad;
  const a = Math.sin(dLat / 2) ** 2 + Math.cos(lat1 * rad) * Math.cos(lat2 * rad) * Math.sin(dLon / 2) ** 2;
  return 2 * R * Math.asin(Math.min(1, Math.sqrt(a)));
}
