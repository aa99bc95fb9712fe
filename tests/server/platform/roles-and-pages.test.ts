import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import request from 'supertest';
import { createTestApp, csrfFromHtml, signInApi, signInPages, type TestApp } from '../../helpers/app';
import { DEMO_USERS } from '../../../seeds/demo-people';

let t: TestApp;
beforeEach(async () => {
  t = await createTestApp();
});
afterEach(async () => {
  await t.close();
});

const ROLE_EMAILS = {
  admin: 'admin@crowntip.test',
  clerk: 'clerk@crowntip.test',
  sampler: 'sampler@crowntip.test',
  auditor: 'auditor@crowntip.test',
} as const;

// Expected status of a GET for each role. 200 = allowed; 403 = forbidden page.
const MATRIX: { path: string; admin: number; clerk: number; sampler: number; auditor: number }[] = [
  { path: '/office', admin: 200, clerk: 200, sampler: 302, auditor: 200 }, // a sampler is sent to /capture
  { path: '/admin/users', admin: 200, clerk: 403, sampler: 403, auditor: 403 },
  { path: '/admin/users/invite', admin: 200, clerk: 403, sampler: 403, auditor: 403 },
  { path: '/admin/outbox', admin: 200, clerk: 403, sampler: 403, auditor: 403 },
  { path: '/admin/rules', admin: 200, clerk: 403, sampler: 403, auditor: 403 },
  { path: '/registry/ranches', admin: 200, clerk: 200, sampler: 200, auditor: 200 },
  { path: '/registry/ranches/new', admin: 200, clerk: 200, sampler: 403, auditor: 403 },
  { path: '/registry/season', admin: 200, clerk: 200, sampler: 200, auditor: 200 },
  { path: '/history', admin: 200, clerk: 200, sampler: 403, auditor: 200 },
  { path: '/registry/import', admin: 200, clerk: 200, sampler: 403, auditor: 403 },
  { path: '/registers', admin: 200, clerk: 200, sampler: 403, auditor: 200 },
  { path: '/account', admin: 200, clerk: 200, sampler: 200, auditor: 200 },
];

describe('role matrix', () => {
  for (const role of Object.keys(ROLE_EMAILS) as (keyof typeof ROLE_EMAILS)[]) {
    it(`${role} gets the expected status on every office page`, async () => {
      const agent = await signInPages(t.app, ROLE_EMAILS[role]);
      for (const row of MATRIX) {
        const res = await agent.get(row.path);
        expect(res.status, `${role} ${row.path}`).toBe(row[role]);
        if (res.status === 403) expect(res.text).toContain('Not allowed');
      }
    });
  }

  it('sends each role to its own home after sign-in', async () => {
    const homes = { admin: '/office', clerk: '/office', sampler: '/capture', auditor: '/office' };
    for (const [role, email] of Object.entries(ROLE_EMAILS)) {
      const agent = request.agent(t.app);
      const page = await agent.get('/login');
      const res = await agent.post('/login').type('form').send({ _csrf: csrfFromHtml(page.text), email, password: 'test-demo-password' });
      expect(res.status).toBe(302);
      expect(res.headers.location).toBe(homes[role as keyof typeof homes]);
    }
  });

  it('sends a signed-out visitor to sign in and back', async () => {
    const res = await request(t.app).get('/admin/users?role=clerk');
    expect(res.status).toBe(302);
    expect(res.headers.location).toBe('/login?next=%2Fadmin%2Fusers%3Frole%3Dclerk');
    const capture = await request(t.app).get('/capture/today');
    expect(capture.headers.location).toBe('/login?next=%2Fcapture%2Ftoday');
  });

  it('follows only same-site next targets after sign-in', async () => {
    const agent = request.agent(t.app);
    const page = await agent.get('/login?next=//elsewhere.test/x');
    expect(page.text).not.toContain('elsewhere.test');
    const res = await agent
      .post('/login')
      .type('form')
      .send({ _csrf: csrfFromHtml(page.text), email: ROLE_EMAILS.clerk, password: 'test-demo-password', next: 'https://elsewhere.test/' });
    expect(res.headers.location).toBe('/office');
  });

  it('answers a forbidden API call with a 403 JSON error', async () => {
    const { agent, csrf } = await signInApi(t.app, ROLE_EMAILS.sampler);
    const res = await agent.post('/admin/users/invite').set('X-CSRF-Token', csrf).type('form').send({ name: 'X', email: 'x@crowntip.test', role: 'admin' });
    expect(res.status).toBe(403);
    const unknown = await agent.get('/api/nothing-here');
    expect(unknown.status).toBe(404);
    expect(unknown.body.error.code).toBe('not_found');
  });

  it('shows the auditor no edit controls on the dashboard', async () => {
    const agent = await signInPages(t.app, ROLE_EMAILS.auditor);
    const res = await agent.get('/office');
    expect(res.text).toContain('read-only access');
    expect(res.text).not.toContain('href="/admin/users"');
  });
});

describe('CSRF on forms', () => {
  it('rejects a form post without a token', async () => {
    const agent = await signInPages(t.app, ROLE_EMAILS.admin);
    const res = await agent.post('/account/preferences').type('form').send({ units: 'metric', language: 'en' });
    expect(res.status).toBe(403);
    expect(res.text).toContain('security token');
  });

  it('rejects a sign-in form without a token', async () => {
    const res = await request(t.app).post('/login').type('form').send({ email: ROLE_EMAILS.admin, password: 'test-demo-password' });
    expect(res.status).toBe(403);
  });
});

describe('organisation isolation', () => {
  it('gives 404 for another organisation’s user ids', async () => {
    const agent = await signInPages(t.app, 'admin@quillwater.test');
    const page = await agent.get('/admin/users');
    expect(page.text).toContain('Priya Castelmoor');
    expect(page.text).not.toContain('crowntip.test');
    const otherOrgsClerk = DEMO_USERS.find((u) => u.email === 'clerk@crowntip.test')!.id;
    const res = await agent.post(`/admin/users/${otherOrgsClerk}/role`).type('form').send({ _csrf: csrfFromHtml(page.text), role: 'admin' });
    expect(res.status).toBe(404);
    const stored = await t.db('users').where('id', otherOrgsClerk).first();
    expect(stored.role).toBe('clerk');
  });

  it('gives 404 for another organisation’s outbox messages', async () => {
    const admin = await signInPages(t.app, ROLE_EMAILS.admin);
    const page = await admin.get('/admin/users/invite');
    await admin.post('/admin/users/invite').type('form').send({ _csrf: csrfFromHtml(page.text), name: 'New Person', email: 'new.person@crowntip.test', role: 'sampler' });
    const message = await t.db('mail_outbox').where('to_address', 'new.person@crowntip.test').first();
    expect((await admin.get(`/admin/outbox/${message.id}`)).status).toBe(200);
    const other = await signInPages(t.app, 'admin@quillwater.test');
    expect((await other.get(`/admin/outbox/${message.id}`)).status).toBe(404);
    expect((await other.get('/admin/outbox')).text).not.toContain('new.person@crowntip.test');
  });
});
