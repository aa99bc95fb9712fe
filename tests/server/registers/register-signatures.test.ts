import { createHash, createHmac } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import type { Express } from 'express';
import { signInApi, signInPages, TEST_SIGNING_KEY, type TestApp } from '../../helpers/app';
import { YEAR, freshScenarioForEachTest, type HandWorkedScenario } from '../../helpers/register-scenario';
import { createApp } from '../../../server/app';
import { loadConfig } from '../../../server/platform/config';

/*
 * Signed registers (README, "Register signatures"). Expected values are worked here with Node's
 * own crypto from the documented formula, not read back from the server's code:
 *   chain(v) = SHA-256("crowntip register chain\n" + link(v-1) + "\n" + contentHash(v)), where
 *   link is the previous version's chain hash ("" for version 1);
 *   signature(v) = HMAC-SHA256(key, chain(v)); key id = first 16 hex of SHA-256("crowntip register key\n" + key).
 */
const sha = (s: string) => createHash('sha256').update(s, 'utf8').digest('hex');
const chain = (link: string, content: string) => sha(`crowntip register chain\n${link}\n${content}`);
const hmac = (key: string, s: string) => createHmac('sha256', key).update(s, 'utf8').digest('hex');
const keyId = (key: string) => sha(`crowntip register key\n${key}`).slice(0, 16);

let t: TestApp;
let s: HandWorkedScenario;
freshScenarioForEachTest((app, scenario) => {
  t = app;
  s = scenario;
});

/** Two finalised versions: v1, then v2 after a registry change (C terminated earlier). */
async function twoVersions() {
  const { agent, csrf } = await signInApi(t.app, 'clerk@crowntip.test');
  const v1 = await agent.post('/api/registers').set('X-CSRF-Token', csrf).send({ ranchId: s.ranchId, year: YEAR });
  expect(v1.status, JSON.stringify(v1.body)).toBe(201);
  await t.db('plantings').where('id', s.plantings.c).update({ terminated_on: '2025-03-25' });
  const v2 = await agent.post('/api/registers').set('X-CSRF-Token', csrf).send({ ranchId: s.ranchId, year: YEAR });
  expect(v2.status, JSON.stringify(v2.body)).toBe(201);
  return { v1: v1.body.id as string, v2: v2.body.id as string };
}

async function pageState(app: Express, id: string): Promise<string> {
  const page = await (await signInPages(app, 'auditor@crowntip.test')).get(`/registers/v/${id}`);
  expect(page.status).toBe(200);
  const m = page.text.match(/data-signature="([a-z_]+)">Server signature:\s*<span class="[a-z-]+">([^<]+)<\/span>/);
  expect(m, 'the proof line on the version page').toBeTruthy();
  return `${m![1]}: ${m![2]}`;
}

describe('register signatures', () => {
  it('stores a chain hash and an HMAC signature that independent code reproduces, and the page says "signature valid"', async () => {
    const { v1, v2 } = await twoVersions();
    const r1 = await t.db('registers').where('id', v1).first();
    const r2 = await t.db('registers').where('id', v2).first();
    expect(r1.content_hash).toBe(sha(r1.snapshot));
    expect(r1.chain_hash).toBe(chain('', r1.content_hash));
    expect(r2.chain_hash).toBe(chain(r1.chain_hash, r2.content_hash));
    expect(r1.signature).toBe(hmac(TEST_SIGNING_KEY, r1.chain_hash));
    expect(r2.signature).toBe(hmac(TEST_SIGNING_KEY, r2.chain_hash));
    expect(r1.signing_key_id).toBe(keyId(TEST_SIGNING_KEY));

    expect(await pageState(t.app, v1)).toBe('valid: signature valid');
    expect(await pageState(t.app, v2)).toBe('valid: signature valid');
    const api = await (await signInApi(t.app, 'auditor@crowntip.test')).agent.get(`/api/registers/${v2}`);
    expect(api.body.signature).toEqual({ state: 'valid', keyId: keyId(TEST_SIGNING_KEY), chainHash: r2.chain_hash });
  });

  it('a finalised row edited through Knex with its SHA-256 recomputed shows "signature invalid", and the break carries down the chain', async () => {
    const { v1, v2 } = await twoVersions();
    const r1 = await t.db('registers').where('id', v1).first();
    const forged = r1.snapshot.replace('"creditKgN":', '"creditKgN":9');
    expect(forged).not.toBe(r1.snapshot);
    await t.db('registers').where('id', v1).update({ snapshot: forged, content_hash: sha(forged) });
    // The old check (text vs hash) is fooled …
    const api = await (await signInApi(t.app, 'auditor@crowntip.test')).agent.get(`/api/registers/${v1}`);
    expect(api.body.hashVerified).toBe(true);
    // … the signature is not.
    expect(api.body.signature.state).toBe('invalid');
    expect(await pageState(t.app, v1)).toBe('invalid: signature invalid');

    // Recomputing v1's chain hash too (without the key the signature cannot follow) breaks v2's link.
    await t.db('registers').where('id', v1).update({ chain_hash: chain('', sha(forged)) });
    expect(await pageState(t.app, v1)).toBe('invalid: signature invalid');
    expect(await pageState(t.app, v2)).toBe('invalid: signature invalid');
  });

  it('after a change of key, old versions verify with the old key listed and say "unknown key" without it', async () => {
    const { v1 } = await twoVersions();
    const NEW_KEY = 'rotated-register-signing-key-fedcba9876543210';
    const rotated = (old: string) =>
      createApp({
        config: loadConfig({ NODE_ENV: 'test', PUBLIC_URL: 'http://crowntip.test:3000' }, { BCRYPT_ROUNDS: 4, REGISTER_SIGNING_KEY: NEW_KEY, REGISTER_SIGNING_KEYS_OLD: old }),
        db: t.db,
        sessionSecret: 'test-secret-test-secret-test-secret',
      });
    expect(await pageState(rotated(`other-retired-key-000000000000000000, ${TEST_SIGNING_KEY}`), v1)).toBe('valid: signature valid');
    expect(await pageState(rotated(''), v1)).toBe('unknown_key: unknown key');

    // A version finalised under the new key is signed with it and chained to the old ones.
    await t.db('plantings').where('id', s.plantings.c).update({ terminated_on: '2025-03-24' });
    const app = rotated(TEST_SIGNING_KEY);
    const { agent, csrf } = await signInApi(app, 'clerk@crowntip.test');
    const v3 = await agent.post('/api/registers').set('X-CSRF-Token', csrf).send({ ranchId: s.ranchId, year: YEAR });
    expect(v3.status, JSON.stringify(v3.body)).toBe(201);
    const r3 = await t.db('registers').where('id', v3.body.id).first();
    expect(r3.signing_key_id).toBe(keyId(NEW_KEY));
    expect(await pageState(app, v3.body.id)).toBe('valid: signature valid');
  });

  it('a version finalised before signing says so honestly', async () => {
    const { v1 } = await twoVersions();
    await t.db('registers').where('id', v1).update({ chain_hash: null, signature: null, signing_key_id: null });
    expect(await pageState(t.app, v1)).toBe('unsigned: not signed');
  });
});
