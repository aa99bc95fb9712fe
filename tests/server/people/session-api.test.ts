import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import request from 'supertest';
import { createTestApp, DEMO_PASSWORD, signInApi, type TestApp } from '../../helpers/app';

let t: TestApp;
beforeEach(async () => {
  t = await createTestApp();
});
afterEach(async () => {
  await t.close();
});

describe('POST /api/session', () => {
  it('signs in with the right password and returns the user', async () => {
    const agent = request.agent(t.app);
    const res = await agent.post('/api/session').send({ email: 'Clerk@Crowntip.test ', password: DEMO_PASSWORD });
    expect(res.status).toBe(200);
    expect(res.body.user).toMatchObject({ email: 'clerk@crowntip.test', role: 'clerk', units: 'us' });
    expect(res.body.user.organisation.name).toMatch(/Bramblecrest/);
    expect(res.headers['set-cookie']?.[0]).toMatch(/crowntip\.sid=.*HttpOnly.*SameSite=Lax/i);
    const me = await agent.get('/api/session');
    expect(me.status).toBe(200);
    expect(me.body.user.role).toBe('clerk');
    expect(typeof me.body.csrfToken).toBe('string');
  });

  it('answers unknown e-mail and wrong password with the same 401 message', async () => {
    const wrong = await request(t.app).post('/api/session').send({ email: 'clerk@crowntip.test', password: 'nope-nope-nope' });
    const unknown = await request(t.app).post('/api/session').send({ email: 'nobody@crowntip.test', password: 'nope-nope-nope' });
    expect(wrong.status).toBe(401);
    expect(unknown.status).toBe(401);
    expect(wrong.body.error.code).toBe('unauthenticated');
    expect(wrong.body.error.message).toBe(unknown.body.error.message);
  });

  it('rejects a malformed body with 400 and field messages', async () => {
    const res = await request(t.app).post('/api/session').send({ email: '', password: 12 });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('invalid');
    expect(Object.keys(res.body.error.fields)).toEqual(expect.arrayContaining(['email', 'password']));
  });

  it('answers broken JSON with 400, not a stack trace', async () => {
    const res = await request(t.app).post('/api/session').set('Content-Type', 'application/json').send('{"email":');
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('invalid');
    // Told what is wrong with the body as a whole, not which fields are missing from it.
    expect(res.body.error.message).toMatch(/not valid JSON/);
    expect(res.body.error.fields ?? {}).toEqual({});
    expect(JSON.stringify(res.body)).not.toMatch(/at .*\.ts/);
  });

  it('regenerates the session id at sign-in', async () => {
    const agent = request.agent(t.app);
    const before = await agent.get('/api/session');
    const cookieBefore = before.headers['set-cookie']?.[0]?.split(';')[0];
    expect(cookieBefore).toMatch(/^crowntip\.sid=/);
    const res = await agent.post('/api/session').send({ email: 'clerk@crowntip.test', password: DEMO_PASSWORD });
    const cookieAfter = res.headers['set-cookie']?.[0]?.split(';')[0];
    expect(cookieAfter).toMatch(/^crowntip\.sid=/);
    expect(cookieAfter).not.toBe(cookieBefore);
    // The old token belonged to the old session: it no longer works.
    const stale = await agent.delete('/api/session').set('X-CSRF-Token', before.body.csrfToken);
    expect(stale.status).toBe(403);
    expect(stale.body.error.code).toBe('csrf');
  });

  it('limits failed sign-ins per account and address pair', async () => {
    for (let i = 0; i < 5; i++) {
      const r = await request(t.app).post('/api/session').send({ email: 'admin@crowntip.test', password: `wrong-${i}-xxxxxx` });
      expect(r.status).toBe(401);
    }
    const limited = await request(t.app).post('/api/session').send({ email: 'admin@crowntip.test', password: DEMO_PASSWORD });
    expect(limited.status).toBe(429);
    expect(limited.body.error.code).toBe('rate_limited');
    // Another account from the same address is not locked by these failures.
    const other = await request(t.app).post('/api/session').send({ email: 'clerk@crowntip.test', password: DEMO_PASSWORD });
    expect(other.status).toBe(200);
  });

  it('limits failed sign-ins per address across accounts', async () => {
    const small = await createTestApp({ SIGNIN_LIMIT_PER_ADDRESS: 3 });
    try {
      for (const who of ['a', 'b', 'c']) {
        const r = await request(small.app).post('/api/session').send({ email: `${who}@crowntip.test`, password: 'wrong-wrong-wrong' });
        expect(r.status).toBe(401);
      }
      const limited = await request(small.app).post('/api/session').send({ email: 'clerk@crowntip.test', password: DEMO_PASSWORD });
      expect(limited.status).toBe(429);
    } finally {
      await small.close();
    }
  });
});

describe('GET and DELETE /api/session', () => {
  it('answers 401 when signed out', async () => {
    const res = await request(t.app).get('/api/session');
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBe('unauthenticated');
  });

  it('signs out with 204 and the session stops working', async () => {
    const { agent, csrf } = await signInApi(t.app, 'sampler@crowntip.test');
    const out = await agent.delete('/api/session').set('X-CSRF-Token', csrf);
    expect(out.status).toBe(204);
    expect((await agent.get('/api/session')).status).toBe(401);
  });

  it('refuses a sign-out without the CSRF header', async () => {
    const { agent } = await signInApi(t.app, 'sampler@crowntip.test');
    const res = await agent.delete('/api/session');
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe('csrf');
    expect((await agent.get('/api/session')).status).toBe(200);
  });

  it('saves units and language with PATCH', async () => {
    const { agent, csrf } = await signInApi(t.app, 'sampler@crowntip.test');
    const res = await agent.patch('/api/session').set('X-CSRF-Token', csrf).send({ units: 'metric', language: 'en' });
    expect(res.status).toBe(200);
    expect((await agent.get('/api/session')).body.user).toMatchObject({ units: 'metric', language: 'en' });
    const bad = await agent.patch('/api/session').set('X-CSRF-Token', csrf).send({ units: 'furlongs' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields.units).toBeTruthy();
  });
});
