import { area } from '@turf/area';
import type { Boundary } from './boundary';

/** Geodesic area of the boundary in hectares (turf's spherical formula). */
export function boundaryAreaHa(boundary: Boundary): number {
  return area({ type: 'Feature', properties: {}, geometry: boundary }) / 10_000;
}

/** True when the entered area and the boundary's differ by more than `tolerance` (10 % by default). */
export function areasDisagree(enteredHa: number, boundaryHa: number, tolerance = 0.1): boolean {
  if (!(enteredHa > 0) || !(boundaryHa > 0)) return false;
  return Math.abs(boundaryHa - enteredHa) / enteredHa > tolerance;
}
