import { describe, expect, it } from 'vitest';
import { csrfFromHtml, signInApi, signInPages, type TestApp, locationOf } from '../../helpers/app';
import { YEAR, freshScenarioForEachTest, type HandWorkedScenario } from '../../helpers/register-scenario';

let t: TestApp;
let s: HandWorkedScenario;
freshScenarioForEachTest((app, scenario) => {
  t = app;
  s = scenario;
});

describe('finalising an identical register again', () => {
  it('is told "Nothing changed since version 1" as a notice on the page, while the API keeps its 409', async () => {
    const clerk = await signInPages(t.app, 'clerk@crowntip.test');
    const draft = await clerk.get(`/registers/${s.ranchId}/${YEAR}`);
    const first = await clerk.post(`/registers/${s.ranchId}/${YEAR}`).type('form').send({ _csrf: csrfFromHtml(draft.text), confirm: 'yes' });
    expect(first.status).toBe(303);

    // A second tab still showing the old draft posts the same rows again.
    const again = await clerk.post(`/registers/${s.ranchId}/${YEAR}`).type('form').send({ _csrf: csrfFromHtml(draft.text), confirm: 'yes' });
    expect(again.status).toBe(303);
    const page = await clerk.get(locationOf(again));
    expect(page.text).toMatch(/<div class="alert alert-info"[^>]*>Nothing changed since version 1\./);
    expect(page.text).not.toContain('alert-error');
    // The draft itself says so beside the disabled button.
    expect(page.text).toContain('Nothing changed since version 1, so there is nothing to amend.');

    const api = await signInApi(t.app, 'clerk@crowntip.test');
    const res = await api.agent.post('/api/registers').set('x-csrf-token', api.csrf).send({ ranchId: s.ranchId, year: YEAR });
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('conflict');
  });
});
