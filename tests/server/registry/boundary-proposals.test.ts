import { randomUUID } from 'node:crypto';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import request from 'supertest';
import type { Polygon } from 'geojson';
import { createTestApp, csrfFromHtml, signInApi, signInPages, type TestApp } from '../../helpers/app';
import { seasonOfDate, todayIso } from '../../../shared/registry/season';
import { boundaryProposalSchema } from '../../../shared/schemas/boundary-proposals';
import { duePlantings } from '../../../server/walks/db';
import { DEMO_ORGANISATIONS } from '../../../seeds/demo-people';

// Boundaries traced on the phone, proposed to the office (README, "Traced boundaries"). Shapes are
// invented rectangles in the open sea near 36.2° N, 134.9° W.

const ORG1 = DEMO_ORGANISATIONS[0].id;
const ORG2 = DEMO_ORGANISATIONS[1].id;
let t: TestApp;
beforeEach(async () => {
  t = await createTestApp();
});
afterEach(async () => {
  await t.close();
});

type Client = Awaited<ReturnType<typeof signInApi>>;
const as = (email: string) => signInApi(t.app, email);
const post = (c: Client, p: string, body: unknown = {}) => c.agent.post(p).set('X-CSRF-Token', c.csrf).send(body as object);

/** A w × h metre rectangle with its south-west corner at (lat, lon): metres per degree at 36.2° on WGS84 (geographiclib, Karney: 110,963 m of latitude, 89,935 m of longitude, over 0.001°). */
function rectangle(w: number, h: number, lat = 36.2, lon = -134.9): Polygon {
  const dLat = h / 110_963;
  const dLon = w / 89_935;
  return { type: 'Polygon', coordinates: [[[lon, lat], [lon + dLon, lat], [lon + dLon, lat + dLat], [lon, lat + dLat], [lon, lat]]] };
}
const BOWTIE: Polygon = { type: 'Polygon', coordinates: [[[-134.9, 36.2], [-134.898, 36.201], [-134.898, 36.2], [-134.9, 36.201], [-134.9, 36.2]]] };

async function fieldWithout(orgId: string) {
  const due = await duePlantings(t.db, orgId, { season: seasonOfDate(todayIso()), today: todayIso() });
  const bare = due.find((d) => !d.boundary);
  if (bare) return bare.fieldId;
  return due[0]!.fieldId;
}
const body = (extra: Record<string, unknown> = {}) => ({ id: randomUUID(), boundary: rectangle(200, 100), pointsRecorded: 180, medianAccuracyM: 4, ...extra });

describe('sending a traced boundary', () => {
  it('answers 401 signed out, 403 to an auditor, 400 naming the field for a bad outline', async () => {
    const fieldId = await fieldWithout(ORG1);
    expect((await request(t.app).post(`/api/fields/${fieldId}/boundary-proposals`).send(body())).status).toBe(401);
    const auditor = await as('auditor@crowntip.test');
    expect((await post(auditor, `/api/fields/${fieldId}/boundary-proposals`, body())).status).toBe(403);
    const sampler = await as('sampler@crowntip.test');
    for (const [extra, field] of [
      [{ boundary: BOWTIE }, 'boundary'],
      [{ id: 'not-a-uuid' }, 'id'],
      [{ pointsRecorded: 2 }, 'pointsRecorded'],
    ] as const) {
      const res = await post(sampler, `/api/fields/${fieldId}/boundary-proposals`, body(extra));
      expect(res.status, JSON.stringify(extra)).toBe(400);
      expect(Object.keys(res.body.error.fields), JSON.stringify(extra)).toContain(field);
    }
    // The crossing is said in plain words.
    const bow = await post(sampler, `/api/fields/${fieldId}/boundary-proposals`, body({ boundary: BOWTIE }));
    expect(bow.body.error.fields.boundary).toMatch(/crosses itself/);
  });

  it('stores a pending proposal once: a re-send answers it (200), other content with the same id is 409, 10 sends at once make one', async () => {
    const fieldId = await fieldWithout(ORG1);
    const sampler = await as('sampler@crowntip.test');
    const b = body();
    const first = await post(sampler, `/api/fields/${fieldId}/boundary-proposals`, b);
    expect(first.status, JSON.stringify(first.body)).toBe(201);
    expect(boundaryProposalSchema.safeParse(first.body).success).toBe(true);
    expect(first.body).toMatchObject({ status: 'pending', fieldId, pointsRecorded: 180, medianAccuracyM: 4, decidedBy: null });
    // 200 m × 100 m = 2 ha (hand-worked); turf's spherical area within 0.5 %.
    expect(first.body.areaHa).toBeGreaterThan(1.99);
    expect(first.body.areaHa).toBeLessThan(2.01);
    expect((await post(sampler, `/api/fields/${fieldId}/boundary-proposals`, b)).status).toBe(200);
    expect((await post(sampler, `/api/fields/${fieldId}/boundary-proposals`, { ...b, pointsRecorded: 181 })).status).toBe(409);
    const again = body();
    const all = await Promise.all(Array.from({ length: 10 }, () => post(sampler, `/api/fields/${fieldId}/boundary-proposals`, again)));
    expect(all.map((r) => r.status).sort()).toEqual([200, 200, 200, 200, 200, 200, 200, 200, 200, 201]);
    expect(await t.db('field_boundary_proposals').count({ n: '*' }).first()).toMatchObject({ n: 2 });
    const list = await sampler.agent.get(`/api/fields/${fieldId}/boundary-proposals?status=pending`);
    expect(list.body.total).toBe(2);
  });

  it('keeps organisations apart: another organisation’s field is 404, its proposal id is 409 and its proposals are not listed', async () => {
    const mine = await fieldWithout(ORG1);
    const theirs = await fieldWithout(ORG2);
    const sampler = await as('sampler@crowntip.test');
    const other = await as('sampler@quillwater.test');
    expect((await post(sampler, `/api/fields/${theirs}/boundary-proposals`, body())).status).toBe(404);
    expect((await sampler.agent.get(`/api/fields/${theirs}/boundary-proposals`)).status).toBe(404);
    const b = body();
    expect((await post(other, `/api/fields/${theirs}/boundary-proposals`, b)).status).toBe(201);
    expect((await post(sampler, `/api/fields/${mine}/boundary-proposals`, b)).status).toBe(409);
    const clerk = await as('clerk@crowntip.test');
    expect((await post(clerk, `/api/fields/${theirs}/boundary-proposals/${b.id}/accept`)).status).toBe(404);
    expect((await post(clerk, `/api/fields/${mine}/boundary-proposals/${b.id}/accept`)).status).toBe(404);
  });
});

describe('the office decides', () => {
  it('accepting makes it the field’s boundary, written to the change history; again is unchanged; a sampler may not', async () => {
    const fieldId = await fieldWithout(ORG1);
    const sampler = await as('sampler@crowntip.test');
    const b = body();
    await post(sampler, `/api/fields/${fieldId}/boundary-proposals`, b);
    expect((await post(sampler, `/api/fields/${fieldId}/boundary-proposals/${b.id}/accept`)).status).toBe(403);
    const clerk = await as('clerk@crowntip.test');
    const ok = await post(clerk, `/api/fields/${fieldId}/boundary-proposals/${b.id}/accept`);
    expect(ok.status, JSON.stringify(ok.body)).toBe(200);
    expect(ok.body).toMatchObject({ status: 'accepted', decidedBy: { name: expect.any(String) } });
    const field = await clerk.agent.get(`/api/fields/${fieldId}`);
    expect(field.body.boundary).toEqual(b.boundary);
    expect(field.body.boundaryAreaHa).toBeCloseTo(ok.body.areaHa, 9);
    const history = await t.db('change_history').where({ entity_id: fieldId, action: 'update' }).orderBy('seq', 'desc').first();
    expect(JSON.parse(history.after).boundary).toEqual(b.boundary);
    expect(history.summary).toMatch(/boundary/);
    expect((await post(clerk, `/api/fields/${fieldId}/boundary-proposals/${b.id}/accept`)).status).toBe(200);
    expect((await post(clerk, `/api/fields/${fieldId}/boundary-proposals/${b.id}/decline`, { reason: 'late' })).status).toBe(409);
  });

  it('declining needs a reason and leaves the field as it was; a declined outline cannot be accepted', async () => {
    const fieldId = await fieldWithout(ORG1);
    const sampler = await as('sampler@crowntip.test');
    const clerk = await as('clerk@crowntip.test');
    const before = (await clerk.agent.get(`/api/fields/${fieldId}`)).body.boundary;
    const b = body();
    await post(sampler, `/api/fields/${fieldId}/boundary-proposals`, b);
    const empty = await post(clerk, `/api/fields/${fieldId}/boundary-proposals/${b.id}/decline`, { reason: ' ' });
    expect(empty.status).toBe(400);
    expect(Object.keys(empty.body.error.fields)).toContain('reason');
    const no = await post(clerk, `/api/fields/${fieldId}/boundary-proposals/${b.id}/decline`, { reason: 'Cut across the corner by the canal.' });
    expect(no.body).toMatchObject({ status: 'declined', declineReason: 'Cut across the corner by the canal.' });
    expect((await clerk.agent.get(`/api/fields/${fieldId}`)).body.boundary).toEqual(before);
    expect((await post(clerk, `/api/fields/${fieldId}/boundary-proposals/${b.id}/accept`)).status).toBe(409);
  });

  it('checks the outline again on accepting: one stored invalid is refused in plain words and nothing changes', async () => {
    const fieldId = await fieldWithout(ORG1);
    const sampler = await as('sampler@crowntip.test');
    const b = body();
    await post(sampler, `/api/fields/${fieldId}/boundary-proposals`, b);
    await t.db('field_boundary_proposals').where({ id: b.id }).update({ boundary: JSON.stringify(BOWTIE) });
    const clerk = await as('clerk@crowntip.test');
    const res = await post(clerk, `/api/fields/${fieldId}/boundary-proposals/${b.id}/accept`);
    expect(res.status).toBe(400);
    expect(res.body.error.fields.boundary).toMatch(/crosses itself/);
    expect((await t.db('field_boundary_proposals').where({ id: b.id }).first()).status).toBe('pending');
  });
});

describe('the field page', () => {
  it('shows a pending outline with Accept and Decline to a clerk, read-only to an auditor; a decline without a reason is refused beside its box', async () => {
    const fieldId = await fieldWithout(ORG1);
    const sampler = await as('sampler@crowntip.test');
    const b = body();
    await post(sampler, `/api/fields/${fieldId}/boundary-proposals`, b);
    const clerk = await signInPages(t.app, 'clerk@crowntip.test');
    const page = await clerk.get(`/registry/fields/${fieldId}`);
    expect(page.status).toBe(200);
    expect(page.text).toContain(`data-proposal="${b.id}"`);
    expect(page.text).toContain('data-proposed-outline');
    expect(page.text).toContain('Accept boundary');
    const auditor = await signInPages(t.app, 'auditor@crowntip.test');
    const read = await auditor.get(`/registry/fields/${fieldId}`);
    expect(read.text).toContain(`data-proposal="${b.id}"`);
    expect(read.text).not.toContain('Accept boundary');

    const csrf = csrfFromHtml(page.text);
    const refused = await clerk.post(`/registry/fields/${fieldId}/boundary-proposals/${b.id}/decline`).type('form').send({ _csrf: csrf, reason: '' });
    expect(refused.status).toBe(303);
    const again = await clerk.get(`/registry/fields/${fieldId}`);
    expect(again.text).toMatch(/id="reason-error">Say why the traced boundary is declined\./);
    const accepted = await clerk.post(`/registry/fields/${fieldId}/boundary-proposals/${b.id}/accept`).type('form').send({ _csrf: csrfFromHtml(again.text) });
    expect(accepted.status).toBe(303);
    const after = await clerk.get(`/registry/fields/${fieldId}`);
    expect(after.text).toContain('Traced boundary accepted');
    expect(after.text).toContain(`data-decided-proposal="${b.id}"`);
    expect(after.text).not.toContain(`data-proposal="${b.id}"`);
  });
});
