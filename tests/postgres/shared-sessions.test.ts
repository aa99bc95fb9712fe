import request from 'supertest';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import type { Express } from 'express';
import type { Knex } from 'knex';
import { createApp } from '../../server/app';
import { openDatabase } from '../../server/platform/database';
import { createTestApp, csrfFromHtml, DEMO_PASSWORD, settled, TEST_SESSION_SECRET, type TestApp } from '../helpers/app';

/*
 * Two app servers on one PostgreSQL database, each with its own connection pool, as behind a load
 * balancer: sessions and CSRF secrets live in the database, so a sign-in on A works on B.
 */
let a: TestApp;
let bDb: Knex;
let b: Express;
beforeEach(async () => {
  a = await createTestApp();
  bDb = openDatabase(a.target, { poolMax: 4 });
  b = createApp({ config: a.config, db: bDb, sessionSecret: TEST_SESSION_SECRET });
});
afterEach(async () => {
  await settled(bDb);
  await bDb.destroy();
  await a.close();
});

const cookieOf = (res: request.Response) => (res.headers['set-cookie'] as unknown as string[]).map((c) => c.split(';')[0]).join('; ');

describe('two servers, one database', () => {
  it('accepts on B the session and the API CSRF token made on A, and a sign-out on B ends it on A', async () => {
    const signIn = await request(a.app).post('/api/session').send({ email: 'clerk@crowntip.test', password: DEMO_PASSWORD });
    expect(signIn.status).toBe(200);
    const cookie = cookieOf(signIn);
    const onA = await request(a.app).get('/api/session').set('Cookie', cookie);
    const csrf = onA.body.csrfToken as string;

    const onB = await request(b).get('/api/session').set('Cookie', cookie);
    expect(onB.status).toBe(200);
    expect(onB.body.user.email).toBe('clerk@crowntip.test');

    // A write on B with A's token, read back on A.
    const made = await request(b).post('/api/ranches').set('Cookie', cookie).set('X-CSRF-Token', csrf).send({ name: 'Made On Server B' });
    expect(made.status).toBe(201);
    const list = await request(a.app).get('/api/ranches').set('Cookie', cookie);
    expect(list.body.items.map((r: { name: string }) => r.name)).toContain('Made On Server B');

    // A wrong token is still refused on B.
    expect((await request(b).post('/api/ranches').set('Cookie', cookie).set('X-CSRF-Token', 'not-the-token').send({ name: 'X' })).status).toBe(403);

    expect((await request(b).delete('/api/session').set('Cookie', cookie).set('X-CSRF-Token', csrf)).status).toBe(204);
    expect((await request(a.app).get('/api/ranches').set('Cookie', cookie)).status).toBe(401);
  });

  it('accepts on B a form posted with the token of a page rendered by A', async () => {
    const login = await request(a.app).get('/login');
    let cookie = cookieOf(login);
    const signedIn = await request(b).post('/login').set('Cookie', cookie).type('form').send({ _csrf: csrfFromHtml(login.text), email: 'admin@crowntip.test', password: DEMO_PASSWORD });
    expect(signedIn.status).toBe(302);
    cookie = signedIn.headers['set-cookie'] ? cookieOf(signedIn) : cookie;
    const page = await request(a.app).get('/admin/users/invite').set('Cookie', cookie);
    expect(page.status).toBe(200);
    const sent = await request(b)
      .post('/admin/users/invite')
      .set('Cookie', cookie)
      .type('form')
      .send({ _csrf: csrfFromHtml(page.text), name: 'Invited Across', email: 'across@crowntip.test', role: 'clerk' });
    expect(sent.status).toBe(302);
    expect(await a.db('users').where('email', 'across@crowntip.test').first()).toBeTruthy();
  });
});
