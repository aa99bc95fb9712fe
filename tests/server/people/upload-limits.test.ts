import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { createTestApp, signInApi, type TestApp } from '../../helpers/app';

// A 1×1 PNG: the body does not matter here, only that a multipart upload arrives.
const TINY_PNG = Buffer.from('iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAIAAACQd1PeAAAADElEQVR4nGPwqtEDAAIIAPXOsRDEAAAAAElFTkSuQmCC', 'base64');
const NO_WALK = '00000000-0000-4000-8000-0000000000aa';

let t: TestApp;
beforeEach(async () => {
  t = await createTestApp({ UPLOAD_LIMIT_PER_HOUR: 2 });
});
afterEach(() => t.close());

const upload = (c: Awaited<ReturnType<typeof signInApi>>) =>
  c.agent.post(`/api/walks/${NO_WALK}/photos`).set('X-CSRF-Token', c.csrf).field('stop', '1').attach('photo', TINY_PNG, 'stop.png');

describe('the upload limit', () => {
  it('refuses the third upload of the hour from one user in plain words, before reading it, and not another user’s', async () => {
    const sampler = await signInApi(t.app, 'sampler@crowntip.test');
    // The first two reach the route (which has no such walk); the limit is 2 per hour.
    expect((await upload(sampler)).status).toBe(404);
    expect((await upload(sampler)).status).toBe(404);
    const third = await upload(sampler);
    expect(third.status).toBe(429);
    expect(third.body.error.message).toMatch(/^2 files have been sent from this account in the last hour/);
    // A JSON write is not an upload: it is not counted or refused.
    expect((await sampler.agent.patch('/api/session').set('X-CSRF-Token', sampler.csrf).send({ language: 'es' })).status).not.toBe(429);
    const other = await signInApi(t.app, 'sampler2@crowntip.test');
    expect((await upload(other)).status).toBe(404);
  });
});
