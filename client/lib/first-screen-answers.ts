import type { SessionResponse } from '../../shared/schemas/session';
import type { TodayItem } from '../../shared/schemas/walks';
import type { Boundary } from '../../shared/registry/boundary';
import { array, boolean, check, nullable, number, object, oneOf, optional, record, refine, string, type Check, type Infer } from './check';

/**
 * The answers the first screen needs (GET /api/session, GET /api/today), checked without zod.
 * Each mirrors its shared zod schema (shared/schemas/session.ts, walks.ts, shared/registry/
 * boundary.ts): the types below must equal the schemas' (a compile error otherwise) and
 * tests/client/first-screen-answers.test.ts runs both on the same answers.
 */

const user = object({
  id: string(1),
  name: string(),
  email: string(),
  role: oneOf(['admin', 'clerk', 'sampler', 'auditor']),
  organisation: object({ id: string(1), name: string() }),
  units: oneOf(['us', 'metric']),
  language: oneOf(['en', 'es']),
});

export const sessionAnswer = object({ user, csrfToken: string(1) });

const position = refine(
  array(number, 2),
  (p) => p.length <= 3 && p[0]! >= -180 && p[0]! <= 180 && p[1]! >= -90 && p[1]! <= 90,
);
const ring = refine(array(position, 4), (r) => r.length <= 20_000 && r[0]![0] === r[r.length - 1]![0] && r[0]![1] === r[r.length - 1]![1]);
const polygon = array(ring, 1);
const polygonShape = object({ type: oneOf(['Polygon']), coordinates: polygon });
const multiPolygonShape = object({ type: oneOf(['MultiPolygon']), coordinates: array(polygon, 1) });

const boundary: Check<Boundary> = check((v) =>
  (v as { type?: unknown } | null)?.type === 'MultiPolygon' ? multiPolygonShape.run(v) : polygonShape.run(v),
);

const walkStatus = oneOf(['draft', 'submitted', 'approved', 'rejected']);

const todayItem = object({
  plantingId: string(),
  fieldId: string(),
  fieldName: string(),
  ranchId: string(),
  ranchName: string(),
  areaHa: number,
  boundary: nullable(boundary),
  season: string(),
  crop: string(),
  variety: nullable(string()),
  seededOn: string(),
  plannedTerminationOn: nullable(string()),
  daysSinceSeeding: number,
  assigned: boolean,
  calibrationId: nullable(string()),
  latestWalk: nullable(object({ id: string(), status: walkStatus, walkedOn: string(), rejectReason: nullable(string()) })),
});

export const todayAnswer = object({ items: array(todayItem), total: number });

/** `{"error": {"code", "message"?, "fields"?}}` (API.md, Conventions). */
export const errorAnswer = object({
  error: object({ code: string(), message: optional(string()), fields: optional(record(string())) }),
});

export const tokenAnswer = object({ csrfToken: string(1) });

// The checks give exactly the types the shared schemas give (a mismatch fails `npx tsc`).
type Same<A, B> = [A] extends [B] ? ([B] extends [A] ? true : false) : false;
const sameSession: Same<Infer<typeof sessionAnswer>, SessionResponse> = true;
const sameToday: Same<Infer<typeof todayItem>, TodayItem> = true;
void sameSession;
void sameToday;
