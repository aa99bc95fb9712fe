import type { WalkNotePart, WalkPlan } from '../../../shared/calc/walk-plan';

/**
 * The walk plan's note as locale keys and values (shared/calc/walk-plan.ts gives it as data), so the
 * phone says in the sampler's language which pattern was used and why. Distances stay in metres
 * here; the screen formats them in the sampler's units.
 */
export type PlanLine =
  | { key: 'plan.pattern.diagonal' | 'plan.pattern.square'; stops: number }
  | { key: 'plan.pattern.parts' | 'plan.pattern.holes' | 'plan.pattern.concave'; stops: number; legs: number }
  | { key: 'plan.marginReduced'; askedM: number; usedM: number };

export function planLines(parts: WalkNotePart[]): PlanLine[] {
  const out: PlanLine[] = [];
  for (const p of parts) {
    if (p.code === 'pattern') {
      if (p.pattern === 'diagonal') out.push({ key: 'plan.pattern.diagonal', stops: p.stops });
      else if (p.pattern === 'square') out.push({ key: 'plan.pattern.square', stops: p.stops });
      else {
        const why = p.reason === 'parts' ? 'parts' : p.reason === 'holes' ? 'holes' : 'concave';
        out.push({ key: `plan.pattern.${why}`, stops: p.stops, legs: p.legs });
      }
    } else if (p.code === 'margin_reduced') out.push({ key: 'plan.marginReduced', askedM: p.askedM, usedM: p.usedM });
    // 'no_boundary' and 'pace' have their own lines on the screen.
  }
  return out;
}

/** How each stop is reached: stop 1 from the start of the first line, a stop on a new line from that line's start, else from the stop before. */
export type StopStep =
  | { kind: 'first'; distanceM: number }
  | { kind: 'new_leg'; leg: number; distanceM: number }
  | { kind: 'previous'; prev: number; distanceM: number };

export function stopSteps(plan: Pick<WalkPlan, 'stops'>): StopStep[] {
  return plan.stops.map((s, k) => {
    if (k === 0) return { kind: 'first', distanceM: s.legDistanceM };
    const before = plan.stops[k - 1]!;
    if (before.leg !== s.leg) return { kind: 'new_leg', leg: s.leg, distanceM: s.legDistanceM };
    return { kind: 'previous', prev: before.index, distanceM: s.distanceM - before.distanceM };
  });
}
