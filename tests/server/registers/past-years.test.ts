import { describe, expect, it } from 'vitest';
import request from 'supertest';
import { csrfFromHtml, signInApi, signInPages, type TestApp, locationOf } from '../../helpers/app';
import { ORG, YEAR, freshScenarioForEachTest, type HandWorkedScenario } from '../../helpers/register-scenario';
import { acToHa } from '../../../shared/calc/units';
import { computeRegister } from '../../../server/registers/service';
import { endOfYear, registryCutoff, rewindRegistry } from '../../../server/registers/registry-as-of';

// Reporting year 2025 (season 2024-25) is over on the machine's clock (tests run after 2025), so
// its drafts read the registry as it stood at the end of 2025 until a version is finalised.
let t: TestApp;
let s: HandWorkedScenario;
freshScenarioForEachTest((app, scenario) => {
  t = app;
  s = scenario;
});

type Agent = ReturnType<typeof request.agent>;
const TODAY = new Date().toISOString().slice(0, 10);

/** Edits a field through the office form, as a clerk does today (the change history records it). */
async function editField(clerk: Agent, fieldId: string, values: { name: string; area: string }) {
  const form = await clerk.get(`/registry/fields/${fieldId}/edit`);
  const res = await clerk.post(`/registry/fields/${fieldId}`).field('_csrf', csrfFromHtml(form.text)).field('ranchId', s.ranchId).field('name', values.name).field('area', values.area);
  expect(res.status).toBe(302);
}
const rowOf = async (fieldId: string, registry?: 'today') => (await computeRegister(t.db, ORG, s.ranchId, YEAR, TODAY, { registry }))!.rows.find((r) => r.fieldId === fieldId);

describe('past years are protected: registers read the registry as it stood', () => {
  it('editing a field’s area today leaves last year’s finalised register and its draft alone, with no amendment prompt', async () => {
    const clerk = await signInPages(t.app, 'clerk@crowntip.test');
    const draft = await clerk.get(`/registers/${s.ranchId}/${YEAR}`);
    const v1 = await clerk.post(`/registers/${s.ranchId}/${YEAR}`).type('form').send({ _csrf: csrfFromHtml(draft.text), confirm: 'yes' });
    expect(v1.status).toBe(303);

    await editField(clerk, s.fields.a, { name: 'A North', area: '12' }); // was 10 ac
    expect(Number((await t.db('fields').where('id', s.fields.a).first()).area_ha)).toBeCloseTo(acToHa(12), 9);

    expect((await rowOf(s.fields.a))!.areaHa).toBeCloseTo(acToHa(10), 9);
    const page = await clerk.get(`/registers/${s.ranchId}/${YEAR}`);
    expect(page.text).toContain('No differences.'); // under "Changes since version 1"
    expect(page.text).not.toContain('data-diff-field');
    expect(page.text).toContain('Nothing changed since version 1, so there is nothing to amend.');
    expect(page.text).toMatch(/<button type="submit" class="btn" disabled>Finalise amendment/);
    expect(page.text).toContain('data-registry="cutoff"');
    expect(page.text).toContain('when version 1 was finalised');

    // The API's draft agrees; finalising again is refused as unchanged.
    const api = await signInApi(t.app, 'clerk@crowntip.test');
    const apiDraft = await api.agent.get(`/api/registers?ranchId=${s.ranchId}&year=${YEAR}&draft=1`);
    expect(apiDraft.body.rows.find((r: { fieldId: string }) => r.fieldId === s.fields.a).areaHa).toBeCloseTo(acToHa(10), 9);
    expect((await api.agent.post('/api/registers').set('x-csrf-token', api.csrf).send({ ranchId: s.ranchId, year: YEAR })).status).toBe(409);
  });

  it('a past year never finalised reads the registry at the end of that year: renames, new fields and area edits stay out', async () => {
    const clerk = await signInPages(t.app, 'clerk@crowntip.test');
    const before = await computeRegister(t.db, ORG, s.ranchId, YEAR, TODAY);
    await editField(clerk, s.fields.a, { name: 'A North renamed', area: '12' });
    const ranchForm = await clerk.get(`/registry/ranches/${s.ranchId}/edit`);
    await clerk.post(`/registry/ranches/${s.ranchId}`).type('form').send({ _csrf: csrfFromHtml(ranchForm.text), name: 'Hand-Worked Ranch West', contactEmails: 'grower@handworked.test' });
    const newField = await clerk.get(`/registry/fields/new?ranchId=${s.ranchId}`);
    await clerk.post('/registry/fields').field('_csrf', csrfFromHtml(newField.text)).field('ranchId', s.ranchId).field('name', 'Z Added Today').field('area', '7');
    await clerk.get('/registry/ranches'); // shows (and clears) the "added" notice

    const after = await computeRegister(t.db, ORG, s.ranchId, YEAR, TODAY);
    expect(after!.ranch.name).toBe('Hand-Worked Ranch');
    expect(after!.rows).toEqual(before!.rows);
    expect(after!.totals).toEqual(before!.totals);
    expect(after!.registryAsOf).toBe(endOfYear(YEAR));
    const page = await clerk.get(`/registers/${s.ranchId}/${YEAR}`);
    expect(page.text).toContain(`the end of ${YEAR}`);
    expect(page.text).not.toContain('Z Added Today');
  });

  it('amending on purpose with today’s registry shows the diff and stores it as the next version', async () => {
    const clerk = await signInPages(t.app, 'clerk@crowntip.test');
    const draft = await clerk.get(`/registers/${s.ranchId}/${YEAR}`);
    await clerk.post(`/registers/${s.ranchId}/${YEAR}`).type('form').send({ _csrf: csrfFromHtml(draft.text), confirm: 'yes' });
    await editField(clerk, s.fields.a, { name: 'A North', area: '12' });

    const today = await clerk.get(`/registers/${s.ranchId}/${YEAR}?registry=today`);
    expect(today.text).toContain('data-registry="today"');
    expect(today.text).toContain('Changes since version 1');
    expect(today.text).toContain('data-diff-field="A North" data-diff-key="areaHa"');
    expect(today.text).toContain('<input type="hidden" name="registry" value="today">');
    expect((await rowOf(s.fields.a, 'today'))!.areaHa).toBeCloseTo(acToHa(12), 9);

    const amended = await clerk.post(`/registers/${s.ranchId}/${YEAR}`).type('form').send({ _csrf: csrfFromHtml(today.text), confirm: 'yes', registry: 'today' });
    expect(amended.status).toBe(303);
    const v2 = await clerk.get(locationOf(amended));
    expect(v2.text).toContain('Amendment: changes from version 1');
    expect(v2.text).toContain('data-diff-field="A North" data-diff-key="areaHa"');
    const stored = await t.db('registers').where({ ranch_id: s.ranchId, year: YEAR, version: 2 }).first();
    const row = JSON.parse(stored.snapshot).rows.find((r: { fieldId: string }) => r.fieldId === s.fields.a);
    expect(row.areaHa).toBeCloseTo(acToHa(12), 9);

    // Version 2 read today's registry, so the draft now stands on it: nothing left to amend.
    const after = await clerk.get(`/registers/${s.ranchId}/${YEAR}`);
    expect(after.text).toContain('Nothing changed since version 2, so there is nothing to amend.');
  });

  it('without a version, today’s registry is compared with the registry at the end of the year', async () => {
    const clerk = await signInPages(t.app, 'clerk@crowntip.test');
    await editField(clerk, s.fields.a, { name: 'A North', area: '12' });
    const page = await clerk.get(`/registers/${s.ranchId}/${YEAR}?registry=today`);
    expect(page.text).toMatch(/Changes in the registry since Dec 31, 2025/);
    expect(page.text).toContain('data-diff-field="A North" data-diff-key="areaHa"');
  });
});

describe('the cut-off and the rewind (pure)', () => {
  it('picks the latest version’s moment, else the end of a finished year, else reads live', () => {
    expect(registryCutoff(2025, { registryAsOf: '2026-03-01T10:00:00.000Z', finalisedAt: '2026-03-01T10:00:01.000Z' }, '2026-12-02T00:00:00.000Z')).toBe('2026-03-01T10:00:00.000Z');
    expect(registryCutoff(2025, { finalisedAt: '2026-03-01T10:00:01.000Z' }, '2026-12-02T00:00:00.000Z')).toBe('2026-03-01T10:00:01.000Z');
    expect(registryCutoff(2025, null, '2026-12-02T00:00:00.000Z')).toBe('2025-12-31T23:59:59.999Z');
    expect(registryCutoff(2026, null, '2026-12-02T00:00:00.000Z')).toBeNull();
  });

  it('undoes changes newest first: a field edited twice ends as before its first edit; a planting moved to this season is left out', () => {
    const ranch = { id: 'r', name: 'R', code: null, county: null, contactEmails: [] };
    const field = (area: number) => ({ ranchId: 'r', ranchName: 'R', fieldId: 'f', fieldName: 'F', areaHa: area, plantingId: 'p', crop: 'cereal_rye', variety: null, seededOn: '2024-10-01', plannedTerminationOn: null, terminatedOn: null });
    const snap = (areaHa: number) => ({ ranchId: 'r', name: 'F', areaHa, boundary: null, notes: null });
    const changes = [
      { seq: 3, at: '2026-02-01T00:00:00.000Z', entityType: 'planting' as const, entityId: 'p', before: { fieldId: 'f', season: '2025-26', crop: 'oats' } },
      { seq: 2, at: '2026-01-02T00:00:00.000Z', entityType: 'field' as const, entityId: 'f', before: snap(5) },
      { seq: 1, at: '2026-01-01T00:00:00.000Z', entityType: 'field' as const, entityId: 'f', before: snap(4) },
    ];
    const state = rewindRegistry({ ranches: [ranch], fields: [field(6)] }, '2024-25', changes);
    expect(state.fields).toEqual([{ ...field(4), plantingId: null, crop: null, seededOn: null }]);
  });
});
