import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import request from 'supertest';
import bcrypt from 'bcryptjs';
import { createTestApp, csrfFromHtml, DEMO_PASSWORD, type TestApp } from '../../helpers/app';
import { at } from '../../helpers/lists';

// Whether an address has an account must not show in how long the answer takes. The demo users'
// hashes are re-made at the configured cost (8 here, ~4× the test default's work per step of 2),
// so a stand-in hash of another cost would show as a difference of several times.
const ROUNDS = 8;
const SAMPLES = 15;

let t: TestApp;
beforeEach(async () => {
  t = await createTestApp({ BCRYPT_ROUNDS: ROUNDS, TRUST_PROXY: 1, SIGNIN_LIMIT_PER_PAIR: 1000, SIGNIN_LIMIT_PER_ADDRESS: 1000, SIGNIN_LIMIT_PER_ACCOUNT: 1000, FORGOT_LIMIT_PER_ACCOUNT: 1000, FORGOT_LIMIT_PER_ADDRESS: 1000 });
  await t.db('users').where('email', 'clerk@crowntip.test').update({ password_hash: await bcrypt.hash(DEMO_PASSWORD, ROUNDS) });
});
afterEach(async () => {
  await new Promise((r) => setTimeout(r, 300)); // let queued messages finish before the database closes
  await t.close();
});

const median = (xs: number[]) => at([...xs].sort((a, b) => a - b), Math.floor(xs.length / 2), 'timing');

/** Times known and unknown requests in alternation, so that a busy machine slows both alike. */
async function medians(send: (email: string) => Promise<unknown>) {
  const known: number[] = [];
  const unknown: number[] = [];
  await send('warm-up@crowntip.test');
  for (let i = 0; i < SAMPLES; i++) {
    for (const [email, into] of [
      ['clerk@crowntip.test', known],
      [`nobody-${i}@crowntip.test`, unknown],
    ] as const) {
      const started = performance.now();
      await send(email);
      into.push(performance.now() - started);
      // A pause between requests, as between two visitors: work the server does after answering
      // (sending a message) is not the answer's time. Client and server share one process here.
      await new Promise((r) => setTimeout(r, 60));
    }
  }
  return { known: median(known), unknown: median(unknown) };
}

describe('no account probing by timing', () => {
  it('sign-in takes the same time for a known address with a wrong password and for an unknown one', async () => {
    const m = await medians((email) => request(t.app).post('/api/session').send({ email, password: 'wrong-password-here' }).expect(401));
    const ratio = Math.max(m.known, m.unknown) / Math.min(m.known, m.unknown);
    expect(ratio, JSON.stringify(m)).toBeLessThan(1.3);
  }, 60_000);

  it('forgot-password takes the same time whether or not a message is sent', async () => {
    const visitor = request.agent(t.app);
    const csrf = csrfFromHtml((await visitor.get('/password/forgot')).text);
    const m = await medians((email) => visitor.post('/password/forgot').type('form').send({ _csrf: csrf, email }).expect(200));
    const ratio = Math.max(m.known, m.unknown) / Math.min(m.known, m.unknown);
    expect(ratio, JSON.stringify(m)).toBeLessThan(1.3);
  }, 60_000);
});
