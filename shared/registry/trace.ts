import type { Polygon } from 'geojson';
import { dist, localFrame, simplifyRing, toLngLat, toXY, type XY } from '../geo/plane';
import { checkBoundary, type BoundaryProblem } from './boundary';
import { boundaryAreaHa } from './boundary-area';

/**
 * A field boundary traced by walking its edge with the phone's location on: positions recorded
 * every few metres (fixes worse than a set accuracy left out), then the outline closed, simplified
 * (Douglas-Peucker in a local plane, shared/geo/plane.ts) and checked like any uploaded boundary.
 */

export interface TracePoint {
  lat: number;
  lon: number;
  /** What the phone reported, metres (68 % radius). */
  accuracyM: number;
}

/** A new position is kept once the sampler has moved this far from the last kept one (a few paces). */
export const TRACE_STEP_M = 3;
/** Fixes less accurate than this are left out: consumer GPS in the open is usually within 5 m (common practice, no published source). */
export const TRACE_MAX_ACCURACY_M = 20;
/** The outline is simplified to within this distance of the positions walked. */
export const TRACE_SIMPLIFY_M = 1.5;
/** Beyond this from the first position at the end, the phone asks to walk back to the start. */
export const TRACE_CLOSE_M = 25;

/** Distance in metres between two positions, in a plane about the first (ample at field scale). */
export function stepM(a: { lat: number; lon: number }, b: { lat: number; lon: number }): number {
  const f = localFrame(a.lon, a.lat);
  return dist([0, 0], toXY(f, [b.lon, b.lat]));
}

/** Whether a fix joins the trace: accurate enough, and a step away from the last one kept. */
export function keepFix(last: TracePoint | null, fix: TracePoint): boolean {
  if (!(fix.accuracyM <= TRACE_MAX_ACCURACY_M)) return false;
  return last === null || stepM(last, fix) >= TRACE_STEP_M;
}

/** Metres walked along the kept positions. */
export function tracedLengthM(points: readonly TracePoint[]): number {
  let s = 0;
  for (let i = 1; i < points.length; i++) s += stepM(points[i - 1]!, points[i]!);
  return s;
}

/** How far the last position is from the first (the gap the outline closes straight). */
export function closingGapM(points: readonly TracePoint[]): number {
  return points.length < 2 ? 0 : stepM(points[0]!, points[points.length - 1]!);
}

export type TraceOutline =
  | { ok: true; boundary: Polygon; areaHa: number; corners: number; pointsRecorded: number; medianAccuracyM: number | null; toleranceM: number }
  | { ok: false; problem: 'too_few_points' | 'no_area' | 'invalid'; detail?: BoundaryProblem };

function median(xs: number[]): number | null {
  if (!xs.length) return null;
  const s = [...xs].sort((a, b) => a - b);
  const m = Math.floor(s.length / 2);
  return s.length % 2 ? s[m]! : (s[m - 1]! + s[m]!) / 2;
}

/**
 * The closed, simplified outline of the positions walked. When simplifying makes edges cross (it
 * can on a narrow neck), a smaller tolerance is tried, down to the positions themselves; an outline
 * that crosses itself even then (the sampler doubled back across it) is refused with the problem.
 */
export function tracedOutline(points: readonly TracePoint[], toleranceM = TRACE_SIMPLIFY_M): TraceOutline {
  if (points.length < 3) return { ok: false, problem: 'too_few_points' };
  const frame = localFrame(points[0]!.lon, points[0]!.lat);
  const ring: XY[] = [];
  for (const p of points) {
    const xy = toXY(frame, [p.lon, p.lat]);
    if (!ring.length || dist(ring[ring.length - 1]!, xy) > 0.01) ring.push(xy);
  }
  if (ring.length > 1 && dist(ring[0]!, ring[ring.length - 1]!) <= 0.01) ring.pop();
  if (ring.length < 3) return { ok: false, problem: 'too_few_points' };
  let last: TraceOutline = { ok: false, problem: 'invalid' };
  for (const tol of [toleranceM, toleranceM / 2, toleranceM / 4, 0]) {
    const simple = simplifyRing(ring, tol).ring;
    const coords = simple.map((xy) => {
      const [lon, lat] = toLngLat(frame, xy);
      return [Math.round(lon * 1e7) / 1e7, Math.round(lat * 1e7) / 1e7];
    });
    coords.push([...coords[0]!]);
    const boundary: Polygon = { type: 'Polygon', coordinates: [coords] };
    const valid = checkBoundary(boundary);
    if (valid.ok) {
      return {
        ok: true,
        boundary,
        areaHa: boundaryAreaHa(boundary),
        corners: coords.length - 1,
        pointsRecorded: points.length,
        medianAccuracyM: median(points.map((p) => p.accuracyM).filter((a) => Number.isFinite(a))),
        toleranceM: tol,
      };
    }
    const p = valid.problem;
    last = { ok: false, problem: p.code === 'no_area' || p.code === 'too_few_corners' ? 'no_area' : 'invalid', detail: p };
    if (tol === 0) break;
  }
  return last;
}
