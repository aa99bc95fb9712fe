import { describe, expect, it } from 'vitest';
import type { MultiPolygon, Position } from 'geojson';
import { planField } from '../../client/features/walk/field-plan';
import { planLines, stopSteps } from '../../client/features/walk/plan-words';
import { newDraft } from '../../client/features/entry/drafts';
import { reviewDraft } from '../../client/features/entry/draft-review';
import type { WalkStop } from '../../shared/calc/walk-plan';

/*
 * The phone's walk plan screen, pure parts: every part of a multi-part field is walked, the seed
 * kept with the walk draws the stops and is sent with it, and each stop says how it is reached.
 */

// Two invented 150 m × 150 m squares 300 m apart at 36° N (open sea). 1° of latitude ≈ 111,195 m and
// 1° of longitude ≈ 111,195 × cos 36° ≈ 89,958 m (mean Earth radius 6,371.0088 km, IUGG).
const M_LAT = 1 / 111_195;
const M_LON = 1 / 89_958;
function square(x0: number, size: number): Position[][] {
  const [lon, lat] = [-135 + x0 * M_LON, 36];
  const d = size * M_LON;
  const e = size * M_LAT;
  return [[[lon, lat], [lon + d, lat], [lon + d, lat + e], [lon, lat + e], [lon, lat]]];
}
const twoParts: MultiPolygon = { type: 'MultiPolygon', coordinates: [square(0, 150), square(450, 150)] };

describe('planField on the phone', () => {
  it('walks both parts of a two-part field, stops shared by area (equal parts: 5 and 5, give or take one)', () => {
    const { plan, shape } = planField(twoParts, 4.5, 10, { edgeMarginM: 10, seed: 'a1' });
    expect(shape).toBe(twoParts);
    expect(plan.legs).toHaveLength(2);
    const perLeg = [1, 2].map((leg) => plan.stops.filter((s) => s.leg === leg).length);
    for (const n of perLeg) expect(Math.abs(n - 5)).toBeLessThanOrEqual(1);
    // The old phone walked only the largest part: every stop on one leg.
    expect(perLeg.every((n) => n > 0)).toBe(true);
  });

  it('the same seed draws the same stops; another seed draws others', () => {
    const a = planField(twoParts, 4.5, 10, { edgeMarginM: 10, seed: 'same' }).plan.stops;
    const b = planField(twoParts, 4.5, 10, { edgeMarginM: 10, seed: 'same' }).plan.stops;
    const c = planField(twoParts, 4.5, 10, { edgeMarginM: 10, seed: 'other' }).plan.stops;
    expect(b).toEqual(a);
    expect(c.map((s) => s.lng)).not.toEqual(a.map((s) => s.lng));
  });

  it("uses the rule's edge margin", () => {
    expect(planField(twoParts, 4.5, 10, { edgeMarginM: 20, seed: 'x' }).plan.edgeMarginM).toBe(20);
  });
});

describe('stopSteps', () => {
  const stop = (index: number, leg: number, distanceM: number, legDistanceM: number) => ({ index, leg, distanceM, legDistanceM }) as WalkStop;
  it('stop 1 from the start of the line, a stop on a new line from its start, others from the stop before', () => {
    // Leg 1 is 100 m; a 40 m crossing; stop 3 lies 15 m into leg 2, so 155 m along the route.
    const steps = stopSteps({ stops: [stop(1, 1, 12, 12), stop(2, 1, 62, 62), stop(3, 2, 155, 15), stop(4, 2, 205, 65)] });
    expect(steps).toEqual([
      { kind: 'first', distanceM: 12 },
      { kind: 'previous', prev: 1, distanceM: 50 },
      { kind: 'new_leg', leg: 2, distanceM: 15 },
      { kind: 'previous', prev: 3, distanceM: 50 },
    ]);
  });
});

describe('planLines', () => {
  it('names the pattern and why, and a reduced margin', () => {
    expect(
      planLines([
        { code: 'pattern', pattern: 'legs', reason: 'parts', legs: 2, stops: 10, marginM: 5 },
        { code: 'margin_reduced', askedM: 10, usedM: 5 },
        { code: 'pace', paceM: 0.76 },
      ]),
    ).toEqual([
      { key: 'plan.pattern.parts', stops: 10, legs: 2 },
      { key: 'plan.marginReduced', askedM: 10, usedM: 5 },
    ]);
    expect(planLines([{ code: 'pattern', pattern: 'diagonal', reason: 'convex', legs: 1, stops: 10, marginM: 10 }])).toEqual([
      { key: 'plan.pattern.diagonal', stops: 10 },
    ]);
  });
});

describe('the plan seed travels with the walk', () => {
  it('is kept in the draft and sent in the walk body with the plan’s stop count', () => {
    const draft = newDraft({
      id: '00000000-0000-4000-8000-000000000001',
      userId: 'u1',
      planting: { plantingId: 'p1', fieldName: 'F', ranchName: 'R', crop: 'cereal_rye', variety: null, calibrationId: null, areaHa: 4 },
      unit: 'cm',
      walkedOn: '2027-02-14',
      now: 0,
      stopCount: 12,
      planSeed: 'k3v9q0z1m2x8',
    });
    expect(draft.stopCount).toBe(12);
    const body = reviewDraft({ ...draft, values: { 1: '80' } }).body;
    expect(body.planSeed).toBe('k3v9q0z1m2x8');
    expect(body.planStops).toBe(12);
  });
});
