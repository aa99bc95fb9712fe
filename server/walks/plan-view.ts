import { distance } from '@turf/distance';
import type { Boundary } from '../../shared/registry/boundary';
import { englishNote, fieldWalkPlan, type WalkPlan } from '../../shared/calc/walk-plan';
import { formatNumber, formatUpTo } from '../../shared/format/figures';
import type { Walk } from '../../shared/schemas/walks';

/*
 * The walk plan a walk was made with, drawn again for the office from what the walk keeps (its
 * seed, stop count and edge margin) and the field's boundary or area, by the same function the
 * phone plans with (shared/calc/walk-plan.ts), so the planned stops here are the phone's.
 */

export interface PlannedStop {
  stop: number;
  /** Null when planned from the area alone (no boundary on file). */
  lat: number | null;
  lon: number | null;
  distanceM: number;
  /** Where the plant was dug, when GPS was recorded, and how far from the planned stop. */
  dug: { lat: number; lon: number; offM: number } | null;
}

export type WalkPlanView =
  | { kind: 'no_seed' }
  | {
      kind: 'planned';
      plan: WalkPlan;
      seed: string;
      note: string;
      /** The boundary on file could not be walked, so the plan used the area. */
      boundaryProblem: boolean;
      stops: PlannedStop[];
      /** Sampling lines as [[lon, lat], [lon, lat]], for the sketch. */
      legs: Array<[[number, number], [number, number]]>;
      /** The field's record changed after the walk was stored: the phone may have had another outline. */
      fieldChangedSince: string | null;
    };

/** A distance in the reader's units: whole feet, or metres (one decimal under 10 m). */
export function readerDistance(m: number, units: 'us' | 'metric'): string {
  if (units === 'us') return `${formatNumber(m / 0.3048)} ft`;
  return `${m < 10 ? formatUpTo(m, 1) : formatNumber(m)} m`;
}

export function walkPlanView(
  walk: Walk,
  field: { boundary: Boundary | null; areaHa: number; updatedAt: string } | null,
  units: 'us' | 'metric' = 'metric',
): WalkPlanView {
  if (!walk.plan || !field) return { kind: 'no_seed' };
  const { plan, boundaryProblem } = fieldWalkPlan(field.boundary, field.areaHa, walk.plan.stops, {
    edgeMarginM: walk.plan.edgeMarginM,
    seed: walk.plan.seed,
  });
  const dugAt = new Map(walk.plants.filter((p) => p.lat != null && p.lon != null).map((p) => [p.stop, { lat: p.lat!, lon: p.lon! }]));
  const stops: PlannedStop[] = plan.stops.map((s) => {
    const d = dugAt.get(s.index);
    const off = d && s.lat !== null && s.lng !== null ? distance([s.lng, s.lat], [d.lon, d.lat], { units: 'meters' }) : null;
    return { stop: s.index, lat: s.lat, lon: s.lng, distanceM: s.distanceM, dug: d && off !== null ? { ...d, offM: off } : null };
  });
  const legs = plan.legs
    .filter((g) => g.start && g.end)
    .map((g) => [[g.start![0], g.start![1]], [g.end![0], g.end![1]]] as [[number, number], [number, number]]);
  const updated = new Date(field.updatedAt as string | Date);
  const changed = updated.getTime() > new Date(walk.createdAt).getTime() ? updated.toISOString() : null;
  return { kind: 'planned', plan, seed: walk.plan.seed, note: englishNote(plan.noteParts, (m) => readerDistance(m, units)), boundaryProblem, stops, legs, fieldChangedSince: changed };
}
