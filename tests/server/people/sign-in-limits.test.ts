import { afterEach, describe, expect, it } from 'vitest';
import request from 'supertest';
import { createTestApp, csrfFromHtml, DEMO_PASSWORD, type TestApp } from '../../helpers/app';

// Client addresses come from X-Forwarded-For: the test app trusts one proxy, as a deployment
// behind one reverse proxy does (README, "Security").
let t: TestApp;
afterEach(async () => {
  await t.close();
});

const signIn = (from: string, email: string, password: string) =>
  request(t.app).post('/api/session').set('X-Forwarded-For', from).send({ email, password });

describe('sign-in limits', () => {
  it('a stranger’s wrong passwords do not lock the account: the owner signs in from another address', async () => {
    t = await createTestApp({ TRUST_PROXY: 1 });
    for (let i = 0; i < 12; i++) expect((await signIn('203.0.113.9', 'clerk@crowntip.test', `wrong-${i}-xxxxxx`)).status).toBeGreaterThanOrEqual(401);
    const owner = await signIn('198.51.100.20', 'clerk@crowntip.test', DEMO_PASSWORD);
    expect(owner.status).toBe(200);
  });

  it('the same account from the same address waits after 5 failures (per pair), even with the right password', async () => {
    t = await createTestApp({ TRUST_PROXY: 1 });
    for (let i = 0; i < 5; i++) expect((await signIn('203.0.113.9', 'clerk@crowntip.test', `wrong-${i}-xxxxxx`)).status).toBe(401);
    const sixth = await signIn('203.0.113.9', 'clerk@crowntip.test', DEMO_PASSWORD);
    expect(sixth.status).toBe(429);
    expect(sixth.body.error.code).toBe('rate_limited');
    // Another account from that address, and this account from elsewhere, are not held up.
    expect((await signIn('203.0.113.9', 'auditor@crowntip.test', DEMO_PASSWORD)).status).toBe(200);
    expect((await signIn('198.51.100.20', 'clerk@crowntip.test', DEMO_PASSWORD)).status).toBe(200);
  });

  it('many failures against one account from many addresses slow it down, never refuse it', async () => {
    t = await createTestApp({ TRUST_PROXY: 1, SIGNIN_LIMIT_PER_ACCOUNT: 4, SIGNIN_SLOWDOWN_MS: 400 });
    for (let i = 0; i < 6; i++) expect((await signIn(`192.0.2.${i + 1}`, 'clerk@crowntip.test', `wrong-${i}-xxxxxx`)).status).toBe(401);
    const started = Date.now();
    const owner = await signIn('198.51.100.20', 'clerk@crowntip.test', DEMO_PASSWORD);
    const took = Date.now() - started;
    expect(owner.status).toBe(200);
    // 6 failures with a threshold of 4: the 2nd failure over it doubles the 400 ms step: 800 ms
    // (the rule in server/people/sign-in-limits.ts, worked by hand).
    expect(took).toBeGreaterThanOrEqual(750);
  });

  it('one address trying many accounts is refused after the per-address limit', async () => {
    t = await createTestApp({ TRUST_PROXY: 1, SIGNIN_LIMIT_PER_ADDRESS: 3 });
    for (const who of ['a', 'b', 'c']) expect((await signIn('203.0.113.9', `${who}@crowntip.test`, 'wrong-wrong-wrong')).status).toBe(401);
    expect((await signIn('203.0.113.9', 'clerk@crowntip.test', DEMO_PASSWORD)).status).toBe(429);
    expect((await signIn('198.51.100.20', 'clerk@crowntip.test', DEMO_PASSWORD)).status).toBe(200);
  });
});

describe('forgotten-password limits', () => {
  async function ask(from: string, email: string) {
    const visitor = request.agent(t.app);
    const page = await visitor.get('/password/forgot').set('X-Forwarded-For', from);
    const res = await visitor.post('/password/forgot').set('X-Forwarded-For', from).type('form').send({ _csrf: csrfFromHtml(page.text), email });
    expect(res.status).toBe(200);
    expect(res.text).toContain('is on its way'); // the same answer whether or not a message is sent
    return res;
  }
  const mailsTo = async (to: string) => {
    await new Promise((r) => setTimeout(r, 300)); // messages are sent after the answer
    return Number((await t.db('mail_outbox').where('to_address', to).count({ n: '*' }).first())?.n);
  };

  it('sends at most the per-account number of messages to one person, from any number of addresses', async () => {
    t = await createTestApp({ TRUST_PROXY: 1 });
    for (let i = 0; i < 8; i++) await ask(`192.0.2.${i + 1}`, 'clerk@crowntip.test');
    expect(await mailsTo('clerk@crowntip.test')).toBe(3);
  });

  it('one address asking for many accounts gets the same answer but sends no more than its limit', async () => {
    t = await createTestApp({ TRUST_PROXY: 1, FORGOT_LIMIT_PER_ADDRESS: 2 });
    for (const who of ['clerk', 'auditor', 'sampler', 'admin']) await ask('203.0.113.9', `${who}@crowntip.test`);
    const total = Number((await t.db('mail_outbox').count({ n: '*' }).first())?.n);
    await mailsTo('x');
    expect(Number((await t.db('mail_outbox').count({ n: '*' }).first())?.n)).toBe(2);
    expect(total).toBeLessThanOrEqual(2);
  });
});
