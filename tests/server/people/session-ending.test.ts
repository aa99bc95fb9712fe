import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import request from 'supertest';
import { createTestApp, csrfFromHtml, DEMO_PASSWORD, latestMail, linkIn, signInApi, signInPages, type TestApp } from '../../helpers/app';
import { DEMO_USERS } from '../../../seeds/demo-people';

let t: TestApp;
beforeEach(async () => {
  t = await createTestApp();
});
afterEach(async () => {
  await t.close();
});

const idOf = (email: string) => DEMO_USERS.find((u) => u.email === email)!.id;

async function postForm(agent: ReturnType<typeof request.agent>, pagePath: string, action: string, body: Record<string, string>) {
  const page = await agent.get(pagePath);
  return agent.post(action).type('form').send({ _csrf: csrfFromHtml(page.text), ...body });
}

const signedIn = async (agent: ReturnType<typeof request.agent>) => (await agent.get('/api/session')).status === 200;

describe('sessions end when the password or the account changes', () => {
  it('a password change ends every other session of the user and keeps the one that changed it', async () => {
    const office = await signInPages(t.app, 'clerk@crowntip.test');
    const phone = await signInApi(t.app, 'clerk@crowntip.test');
    const colleague = await signInApi(t.app, 'auditor@crowntip.test');
    const res = await postForm(office, '/account', '/account/password', { current: DEMO_PASSWORD, password: 'a-new-password-77', confirm: 'a-new-password-77' });
    expect(res.status).toBe(302);
    expect(await signedIn(office)).toBe(true);
    expect((await office.get('/account')).text).toContain('Your password is changed.');
    expect(await signedIn(phone.agent)).toBe(false);
    expect(await signedIn(colleague.agent)).toBe(true); // another user's session is untouched
  });

  it('a reset link ends every session of the user, including the one that used it', async () => {
    const phone = await signInApi(t.app, 'clerk@crowntip.test');
    const visitor = request.agent(t.app);
    const forgot = await visitor.get('/password/forgot');
    await visitor.post('/password/forgot').type('form').send({ _csrf: csrfFromHtml(forgot.text), email: 'clerk@crowntip.test' });
    await new Promise((r) => setTimeout(r, 200)); // the e-mail is sent after the answer
    const link = new URL(linkIn((await latestMail(t.db, 'clerk@crowntip.test')).text_body));
    const form = await visitor.get(link.pathname);
    const done = await visitor.post(link.pathname).type('form').send({ _csrf: csrfFromHtml(form.text), password: 'reset-password-88', confirm: 'reset-password-88' });
    expect(done.status).toBe(302);
    expect(await signedIn(phone.agent)).toBe(false);
    expect((await request(t.app).post('/api/session').send({ email: 'clerk@crowntip.test', password: 'reset-password-88' })).status).toBe(200);
  });

  it('deactivating a user ends their sessions for good: re-activation does not bring them back', async () => {
    const sampler = await signInApi(t.app, 'sampler@crowntip.test');
    const admin = await signInPages(t.app, 'admin@crowntip.test');
    const id = idOf('sampler@crowntip.test');
    // Deactivate and re-activate before the sampler makes any request in between.
    await postForm(admin, '/admin/users', `/admin/users/${id}/active`, { active: 'false' });
    await postForm(admin, '/admin/users', `/admin/users/${id}/active`, { active: 'true' });
    expect(await signedIn(sampler.agent)).toBe(false);
    expect((await request(t.app).post('/api/session').send({ email: 'sampler@crowntip.test', password: DEMO_PASSWORD })).status).toBe(200);
  });
});
