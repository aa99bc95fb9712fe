import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import request from 'supertest';
import { createTestApp, DEMO_PASSWORD, settled, signInApi, type TestApp } from '../helpers/app';
import { DatabaseAttemptStore } from '../../server/people/attempts-db';

/*
 * Two app servers on one PostgreSQL database count sign-in failures and reset e-mails in one
 * store (table attempt_counts), so a client alternating between them meets one limit; uploads too.
 */
let a: TestApp;
let b: TestApp;
beforeEach(async () => {
  a = await createTestApp({ TRUST_PROXY: 1 });
  b = await createTestApp({ TRUST_PROXY: 1 }, { sameDatabaseAs: a });
});
afterEach(async () => {
  await b.close();
  await a.close();
});

async function signIn(t: TestApp, password: string) {
  const res = await request(t.app).post('/api/session').set('X-Forwarded-For', '203.0.113.9').send({ email: 'clerk@crowntip.test', password });
  await settled(t.db); // the failure is counted once the answer is sent
  return res.status;
}

describe('limits shared by two servers', () => {
  it('refuses the 6th try of one account from one address after 5 failures spread over A and B', async () => {
    // The per-pair limit is 5 failures in 15 minutes (SIGNIN_LIMIT_PER_PAIR, default 5).
    for (let i = 0; i < 5; i++) expect(await signIn(i % 2 ? b : a, `wrong-${i}-xxxxxx`)).toBe(401);
    expect(await signIn(a, DEMO_PASSWORD)).toBe(429);
    expect(await signIn(b, DEMO_PASSWORD)).toBe(429);
    const stored = await a.db('attempt_counts').where({ key: 'pair:clerk@crowntip.test|203.0.113.9' }).first();
    expect(Number(stored.count)).toBe(5);
  });

  it('counts uploads sent to A and B against one hourly limit', async () => {
    const small = await createTestApp({ UPLOAD_LIMIT_PER_HOUR: 2 }, { sameDatabaseAs: a });
    const smallB = await createTestApp({ UPLOAD_LIMIT_PER_HOUR: 2 }, { sameDatabaseAs: a });
    try {
      const onA = await signInApi(small.app, 'sampler@crowntip.test');
      const onB = await signInApi(smallB.app, 'sampler@crowntip.test');
      const png = Buffer.from('iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAIAAACQd1PeAAAADElEQVR4nGPwqtEDAAIIAPXOsRDEAAAAAElFTkSuQmCC', 'base64');
      const send = (c: typeof onA) => c.agent.post('/api/walks/00000000-0000-4000-8000-0000000000aa/photos').set('X-CSRF-Token', c.csrf).field('stop', '1').attach('photo', png, 'stop.png');
      // One upload on each server (both reach the route: no such walk), then the third is refused on either.
      expect((await send(onA)).status).toBe(404);
      expect((await send(onB)).status).toBe(404);
      expect((await send(onA)).status).toBe(429);
      expect((await send(onB)).status).toBe(429);
    } finally {
      await smallB.close();
      await small.close();
    }
  });

  it('counts concurrent hits atomically and starts a new window once the old one has ended', async () => {
    const one = new DatabaseAttemptStore(a.db);
    const two = new DatabaseAttemptStore(b.db);
    const counts = await Promise.all(Array.from({ length: 20 }, (_, i) => (i % 2 ? one : two).hit('test:key', 60_000)));
    // 20 hits at once from two servers: each count from 1 to 20 answered exactly once.
    expect([...counts].sort((x, y) => x - y)).toEqual(Array.from({ length: 20 }, (_, i) => i + 1));
    expect(await two.count('test:key')).toBe(20);
    await one.hit('test:short', 1);
    await new Promise((r) => setTimeout(r, 5));
    expect(await one.count('test:short')).toBe(0);
    expect(await two.hit('test:short', 60_000)).toBe(1);
    await one.reset('test:key');
    expect(await two.count('test:key')).toBe(0);
  });
});
