import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import request from 'supertest';
import { createTestApp, csrfFromHtml, latestMail, linkIn, signInApi, signInPages, type TestApp } from '../../helpers/app';
import { DEMO_USERS } from '../../../seeds/demo-people';

let t: TestApp;
beforeEach(async () => {
  t = await createTestApp();
});
afterEach(async () => {
  vi.useRealTimers();
  await t.close();
});

const idOf = (email: string) => DEMO_USERS.find((u) => u.email === email)!.id;

async function postForm(agent: ReturnType<typeof request.agent>, pagePath: string, action: string, body: Record<string, string>) {
  const page = await agent.get(pagePath);
  return agent.post(action).type('form').send({ _csrf: csrfFromHtml(page.text), ...body });
}

describe('deactivation', () => {
  it('stops a deactivated user’s open sessions at once and refuses new sign-ins', async () => {
    const sampler = await signInApi(t.app, 'sampler@crowntip.test');
    expect((await sampler.agent.get('/api/session')).status).toBe(200);

    const admin = await signInPages(t.app, 'admin@crowntip.test');
    const res = await postForm(admin, '/admin/users', `/admin/users/${idOf('sampler@crowntip.test')}/active`, { active: 'false' });
    expect(res.status).toBe(302);

    expect((await sampler.agent.get('/api/session')).status).toBe(401);
    const again = await request(t.app).post('/api/session').send({ email: 'sampler@crowntip.test', password: 'test-demo-password' });
    expect(again.status).toBe(401);

    await postForm(admin, '/admin/users', `/admin/users/${idOf('sampler@crowntip.test')}/active`, { active: 'true' });
    const back = await request(t.app).post('/api/session').send({ email: 'sampler@crowntip.test', password: 'test-demo-password' });
    expect(back.status).toBe(200);
  });

  it('does not let an admin deactivate themself or remove the last admin', async () => {
    const admin = await signInPages(t.app, 'admin@crowntip.test');
    const self = await postForm(admin, '/admin/users', `/admin/users/${idOf('admin@crowntip.test')}/active`, { active: 'false' });
    expect(self.status).toBe(409);
    const demote = await postForm(admin, '/admin/users', `/admin/users/${idOf('admin@crowntip.test')}/role`, { role: 'clerk' });
    expect(demote.status).toBe(409);
  });
});

describe('roles', () => {
  it('a role change applies to the next request', async () => {
    const clerk = await signInPages(t.app, 'clerk@crowntip.test');
    expect((await clerk.get('/admin/users')).status).toBe(403);
    const admin = await signInPages(t.app, 'admin@crowntip.test');
    await postForm(admin, '/admin/users', `/admin/users/${idOf('clerk@crowntip.test')}/role`, { role: 'admin' });
    expect((await clerk.get('/admin/users')).status).toBe(200);
  });

  it('rejects an unknown role with 400', async () => {
    const admin = await signInPages(t.app, 'admin@crowntip.test');
    const res = await postForm(admin, '/admin/users', `/admin/users/${idOf('clerk@crowntip.test')}/role`, { role: 'owner' });
    expect(res.status).toBe(400);
  });
});

describe('users table', () => {
  it('filters by role and text and sorts both ways', async () => {
    const admin = await signInPages(t.app, 'admin@crowntip.test');
    const samplers = await admin.get('/admin/users?role=sampler');
    expect(samplers.text).toContain('Rosalía Quintanar');
    expect(samplers.text).toContain('Teo Marquenda');
    expect(samplers.text).not.toContain('Jonah Pellbrook');
    const byText = await admin.get('/admin/users?q=pell');
    expect(byText.text).toContain('Jonah Pellbrook');
    expect(byText.text).not.toContain('Wendell Oskarby');
    const asc = (await admin.get('/admin/users?sort=email&dir=asc')).text;
    const desc = (await admin.get('/admin/users?sort=email&dir=desc')).text;
    expect(asc.indexOf('admin@crowntip.test')).toBeLessThan(asc.indexOf('sampler@crowntip.test'));
    expect(desc.indexOf('admin@crowntip.test')).toBeGreaterThan(desc.indexOf('sampler@crowntip.test'));
    // Nonsense filters fall back to defaults instead of failing.
    expect((await admin.get('/admin/users?sort=password_hash&dir=sideways')).status).toBe(200);
  });
});

describe('invitations', () => {
  it('invites a user, who sets a password through the one-time link and signs in', async () => {
    const admin = await signInPages(t.app, 'admin@crowntip.test');
    const res = await postForm(admin, '/admin/users/invite', '/admin/users/invite', { name: 'Lena Corvath', email: 'Lena@Crowntip.test', role: 'clerk' });
    expect(res.status).toBe(302);
    const mail = await latestMail(t.db, 'lena@crowntip.test');
    expect(mail.subject).toContain('invited you');
    const link = new URL(linkIn(mail.text_body));
    expect(link.pathname).toMatch(/^\/invite\//);

    const visitor = request.agent(t.app);
    const form = await visitor.get(link.pathname);
    expect(form.status).toBe(200);
    expect(form.text).toContain('lena@crowntip.test');
    const bad = await visitor.post(link.pathname).type('form').send({ _csrf: csrfFromHtml(form.text), password: 'short', confirm: 'short' });
    expect(bad.status).toBe(400);
    expect(bad.text).toContain('at least 10 characters');
    const ok = await visitor.post(link.pathname).type('form').send({ _csrf: csrfFromHtml(form.text), password: 'a-long-new-password', confirm: 'a-long-new-password' });
    expect(ok.status).toBe(302);
    const signIn = await request(t.app).post('/api/session').send({ email: 'lena@crowntip.test', password: 'a-long-new-password' });
    expect(signIn.status).toBe(200);
    expect(signIn.body.user.role).toBe('clerk');
  });

  it('refuses an address that already has an account, keeping what was typed', async () => {
    const admin = await signInPages(t.app, 'admin@crowntip.test');
    const res = await postForm(admin, '/admin/users/invite', '/admin/users/invite', { name: 'Someone Else', email: 'clerk@crowntip.test', role: 'clerk' });
    expect(res.status).toBe(400);
    expect(res.text).toContain('already has a Crowntip account');
    expect(res.text).toContain('value="Someone Else"');
  });
});

describe('password reset', () => {
  async function requestReset(email: string) {
    const visitor = request.agent(t.app);
    const page = await visitor.get('/password/forgot');
    const res = await visitor.post('/password/forgot').type('form').send({ _csrf: csrfFromHtml(page.text), email });
    expect(res.status).toBe(200);
    expect(res.text).toContain('is on its way');
    await new Promise((r) => setTimeout(r, 200)); // the message is sent after the answer
    return visitor;
  }

  it('sends a link that works once', async () => {
    const visitor = await requestReset('clerk@crowntip.test');
    const link = new URL(linkIn((await latestMail(t.db, 'clerk@crowntip.test')).text_body));
    const form = await visitor.get(link.pathname);
    const csrf = csrfFromHtml(form.text);
    const first = await visitor.post(link.pathname).type('form').send({ _csrf: csrf, password: 'brand-new-password', confirm: 'brand-new-password' });
    expect(first.status).toBe(302);
    const second = await visitor.post(link.pathname).type('form').send({ _csrf: csrf, password: 'another-password-1', confirm: 'another-password-1' });
    expect(second.status).toBe(410);
    expect(second.text).toContain('already been used');
    expect((await request(t.app).post('/api/session').send({ email: 'clerk@crowntip.test', password: 'brand-new-password' })).status).toBe(200);
    expect((await request(t.app).post('/api/session').send({ email: 'clerk@crowntip.test', password: 'another-password-1' })).status).toBe(401);
  });

  it('refuses an expired link', async () => {
    await requestReset('clerk@crowntip.test');
    const link = new URL(linkIn((await latestMail(t.db, 'clerk@crowntip.test')).text_body));
    vi.useFakeTimers({ toFake: ['Date'] });
    vi.setSystemTime(Date.now() + (t.config.RESET_LINK_MINUTES + 1) * 60_000);
    const res = await request(t.app).get(link.pathname);
    expect(res.status).toBe(410);
    expect(res.text).toContain('expired');
  });

  it('answers the same for an unknown address and sends nothing', async () => {
    await requestReset('nobody@crowntip.test');
    expect(await t.db('mail_outbox').count({ n: '*' }).first()).toEqual({ n: 0 });
  });

  it('an admin can send a reset link from the users table', async () => {
    const admin = await signInPages(t.app, 'admin@crowntip.test');
    const res = await postForm(admin, '/admin/users', `/admin/users/${idOf('auditor@crowntip.test')}/reset`, {});
    expect(res.status).toBe(302);
    expect((await latestMail(t.db, 'auditor@crowntip.test')).subject).toContain('new password');
  });
});

describe('own account', () => {
  it('changes the password only with the current one', async () => {
    const agent = await signInPages(t.app, 'auditor@crowntip.test');
    const wrong = await postForm(agent, '/account', '/account/password', { current: 'not-it-at-all', password: 'fresh-password-22', confirm: 'fresh-password-22' });
    expect(wrong.status).toBe(400);
    expect(wrong.text).toContain('not your current password');
    const ok = await postForm(agent, '/account', '/account/password', { current: 'test-demo-password', password: 'fresh-password-22', confirm: 'fresh-password-22' });
    expect(ok.status).toBe(302);
    expect((await request(t.app).post('/api/session').send({ email: 'auditor@crowntip.test', password: 'fresh-password-22' })).status).toBe(200);
  });

  it('saves units and language, and rejects others inline', async () => {
    const agent = await signInPages(t.app, 'sampler@crowntip.test');
    const ok = await postForm(agent, '/account', '/account/preferences', { units: 'metric', language: 'es' });
    expect(ok.status).toBe(302);
    const row = await t.db('users').where('email', 'sampler@crowntip.test').first();
    expect(row).toMatchObject({ units: 'metric', language: 'es' });
    const bad = await postForm(agent, '/account', '/account/preferences', { units: 'cubits', language: 'es' });
    expect(bad.status).toBe(400);
    expect(bad.text).toContain('Choose US customary or metric units.');
  });
});
