import { describe, expect, it } from 'vitest';
import { sessionResponseSchema } from '../../shared/schemas/session';
import { todayResponseSchema } from '../../shared/schemas/walks';
import { errorAnswer, sessionAnswer, todayAnswer } from '../../client/lib/first-screen-answers';
import { z } from 'zod';

// The first screen checks its answers without zod (client/lib/first-screen-answers.ts). The
// reference is the shared zod schema the server answers by: on every answer below both must agree
// (accept or refuse), and an accepted answer must come out the same (unknown keys dropped).

const session = {
  user: {
    id: 'u-7',
    name: 'Rosa Demo',
    email: 'rosa@example.test',
    role: 'sampler',
    organisation: { id: 'o-1', name: 'Demo Cover Crops' },
    units: 'metric',
    language: 'es',
  },
  csrfToken: 'tok',
};

// A square field: four corners and the first repeated (RFC 7946 3.1.6).
const square = [
  [-120.5, 36.1],
  [-120.49, 36.1],
  [-120.49, 36.11],
  [-120.5, 36.11],
  [-120.5, 36.1],
] as const;
const item = {
  plantingId: 'p1',
  fieldId: 'f1',
  fieldName: 'North 40',
  ranchId: 'r1',
  ranchName: 'Demo Ranch',
  areaHa: 16.2,
  boundary: { type: 'Polygon', coordinates: [square] },
  season: '2026',
  crop: 'cereal_rye',
  variety: null,
  seededOn: '2026-10-01',
  plannedTerminationOn: null,
  daysSinceSeeding: 62,
  assigned: true,
  calibrationId: 'c1',
  latestWalk: { id: 'w1', status: 'rejected', walkedOn: '2026-11-20', rejectReason: 'Too few plants' },
};
const today = { items: [item], total: 1 };

type Patch = [string, unknown];
const withUser = (patch: object) => ({ ...session, user: { ...session.user, ...patch } });
const withItem = (patch: object) => ({ ...today, items: [{ ...item, ...patch }] });

const sessionCases: Patch[] = [
  ['the answer as sent', session],
  ['an extra key (dropped)', { ...session, user: { ...session.user, passwordHash: 'x' }, extra: 1 }],
  ['each role', withUser({ role: 'admin' })],
  ['an unknown role', withUser({ role: 'owner' })],
  ['unknown units', withUser({ units: 'imperial' })],
  ['an unknown language', withUser({ language: 'fr' })],
  ['a missing language', withUser({ language: undefined })],
  ['a numeric id', withUser({ id: 7 })],
  ['an empty id', withUser({ id: '' })],
  ['an organisation without id', withUser({ organisation: { name: 'x' } })],
  ['an empty organisation id', withUser({ organisation: { id: '', name: 'x' } })],
  ['no organisation', withUser({ organisation: null })],
  ['an empty token', { ...session, csrfToken: '' }],
  ['no token', { user: session.user }],
  ['null', null],
  ['an array', [session]],
  ['a string', 'session'],
];

const todayCases: Patch[] = [
  ['the list as sent', today],
  ['an empty list', { items: [], total: 0 }],
  ['an extra key on an item (dropped)', withItem({ notes: 'x' })],
  ['no boundary', withItem({ boundary: null })],
  ['a multipolygon', withItem({ boundary: { type: 'MultiPolygon', coordinates: [[square], [square]] } })],
  ['a position with altitude', withItem({ boundary: { type: 'Polygon', coordinates: [[...square.slice(0, 4).map((p) => [...p, 12]), [...square[0], 12]]] } })],
  ['a ring not closed', withItem({ boundary: { type: 'Polygon', coordinates: [square.slice(0, 4)] } })],
  ['a ring of three positions', withItem({ boundary: { type: 'Polygon', coordinates: [[square[0], square[1], square[0]]] } })],
  ['a polygon without rings', withItem({ boundary: { type: 'Polygon', coordinates: [] } })],
  ['a multipolygon without parts', withItem({ boundary: { type: 'MultiPolygon', coordinates: [] } })],
  ['latitude out of range', withItem({ boundary: { type: 'Polygon', coordinates: [square.map(([x, y]) => [x, y + 60])] } })],
  ['longitude out of range', withItem({ boundary: { type: 'Polygon', coordinates: [square.map(([x, y]) => [x - 70, y])] } })],
  ['a position of one number', withItem({ boundary: { type: 'Polygon', coordinates: [[[1], ...square]] } })],
  ['a position of four numbers', withItem({ boundary: { type: 'Polygon', coordinates: [[[...square[0], 1, 2], ...square.slice(1, 4), [...square[0], 1, 2]]] } })],
  ['a Point', withItem({ boundary: { type: 'Point', coordinates: [1, 2] } })],
  ['a boundary without type', withItem({ boundary: { coordinates: [square] } })],
  ['an area as text', withItem({ areaHa: '16.2' })],
  ['an infinite area', withItem({ areaHa: Infinity })],
  ['a variety', withItem({ variety: 'Elbon' })],
  ['a numeric variety', withItem({ variety: 5 })],
  ['assigned as text', withItem({ assigned: 'yes' })],
  ['no latest walk', withItem({ latestWalk: null })],
  ['an unknown walk status', withItem({ latestWalk: { ...item.latestWalk, status: 'lost' } })],
  ['a latest walk without reason', withItem({ latestWalk: { id: 'w1', status: 'submitted', walkedOn: '2026-11-20' } })],
  ['a missing field name', withItem({ fieldName: undefined })],
  ['no total', { items: [item] }],
  ['items not a list', { items: item, total: 1 }],
];

describe.each([
  ['GET /api/session', sessionAnswer, sessionResponseSchema, sessionCases],
  ['GET /api/today', todayAnswer, todayResponseSchema, todayCases],
] as const)('%s: the light check agrees with the shared zod schema', (_name, light, schema, cases) => {
  it.each(cases)('%s', (_label, answer) => {
    const expected = schema.safeParse(answer);
    const got = light.safeParse(answer);
    expect(got.success).toBe(expected.success);
    if (expected.success && got.success) expect(got.data).toEqual(expected.data);
  });

  it('accepts the answer as sent and refuses at least one of the others (the cases are not all alike)', () => {
    expect(cases.filter(([, a]) => !schema.safeParse(a).success).length).toBeGreaterThan(3);
  });
});

describe('error answers', () => {
  // API.md, Conventions: {"error": {"code", "message"?, "fields"?}}.
  const reference = z.object({
    error: z.object({ code: z.string(), message: z.string().optional(), fields: z.record(z.string(), z.string()).optional() }),
  });
  it.each([
    ['code only', { error: { code: 'not_found' } }],
    ['code, message and fields', { error: { code: 'validation', message: 'Check the form', fields: { lengthCm: 'Too long' } } }],
    ['a field message that is not text', { error: { code: 'validation', fields: { lengthCm: 3 } } }],
    ['no code', { error: { message: 'x' } }],
    ['an HTML page', '<html>'],
  ])('%s', (_label, answer) => {
    const expected = reference.safeParse(answer);
    const got = errorAnswer.safeParse(answer);
    expect(got.success).toBe(expected.success);
    if (expected.success && got.success) expect(got.data).toEqual(expected.data);
  });
});
