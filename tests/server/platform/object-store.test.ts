import { randomUUID } from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { Readable } from 'node:stream';
import { afterAll, afterEach, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { loadConfig } from '../../../server/platform/config';
import { HttpError } from '../../../server/platform/errors';
import { DiskStore, readAll, type ObjectStore } from '../../../server/platform/object-store';
import { openObjectStore } from '../../../server/platform/open-object-store';
import { duePlantings } from '../../../server/walks/db';
import { seasonOfDate, todayIso } from '../../../shared/registry/season';
import { DEMO_ORGANISATIONS } from '../../../seeds/demo-people';
import { createTestApp, csrfFromHtml, signInApi, signInPages, type TestApp } from '../../helpers/app';
import { startFakeS3, type FakeS3 } from '../../helpers/fake-s3';
import { at, only } from '../../helpers/lists';

// Uploaded files kept on the server's disk (the default) or in an S3-compatible store, here a local
// s3rver this file starts on a free port: the same answers through one interface, photos still
// served only through the app after its organisation check, and a store that is down answers 503
// in plain words with nothing half kept.

const ORG1 = DEMO_ORGANISATIONS[0].id;
/** A real 1 × 1 PNG. */
const TINY_PNG = Buffer.from('iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAIAAACQd1PeAAAADElEQVR4nGPwqtEDAAIIAPXOsRDEAAAAAElFTkSuQmCC', 'base64');

let s3: FakeS3;
let dir: string;
beforeAll(async () => {
  s3 = await startFakeS3();
});
afterAll(async () => {
  await s3.remove();
});
beforeEach(() => {
  dir = fs.mkdtempSync(path.join(os.tmpdir(), 'crowntip-store-'));
});
afterEach(async () => {
  await s3.start(); // after a test that stopped it
  fs.rmSync(dir, { recursive: true, force: true });
});

const stores: [string, () => ObjectStore][] = [
  ['disk', () => new DiskStore(dir)],
  ['S3-compatible', () => openObjectStore(loadConfig({ ...s3.env, S3_PREFIX: `t${randomUUID().slice(0, 8)}/` }))],
];

describe.each(stores)('the %s store', (_name, open) => {
  it('puts, gets, replaces, lists and deletes by key', async () => {
    const store = open();
    await store.health();
    expect(await store.get('photos/a/b/1.png')).toBeNull();
    expect(await store.exists('photos/a/b/1.png')).toBe(false);

    await store.put('photos/a/b/1.png', TINY_PNG, { what: 'the photo', contentType: 'image/png' });
    const got = await store.get('photos/a/b/1.png');
    expect(got!.size).toBe(TINY_PNG.length);
    expect((await readAll(got!)).equals(TINY_PNG)).toBe(true);
    expect(await store.exists('photos/a/b/1.png')).toBe(true);

    // A stream is stored whole too, and a second put replaces the first.
    await store.put('imports/x.json', Readable.from([Buffer.from('{"a":'), Buffer.from('1}')]), { what: 'the file' });
    await store.put('imports/x.json', Buffer.from('{"a":2}'), { what: 'the file' });
    expect((await readAll((await store.get('imports/x.json'))!)).toString()).toBe('{"a":2}');

    expect((await store.list('photos/')).map((o) => o.key)).toEqual(['photos/a/b/1.png']);
    const listed = only(await store.list('imports/'), 'stored object');
    expect(listed.key).toBe('imports/x.json');
    expect(Math.abs(listed.modified.getTime() - Date.now())).toBeLessThan(60_000);

    await store.delete('photos/a/b/1.png');
    await store.delete('photos/a/b/1.png'); // already gone: no error
    expect(await store.get('photos/a/b/1.png')).toBeNull();
  });

  it('refuses keys that leave the store', async () => {
    const store = open();
    for (const key of ['../escape.png', 'photos/../../escape.png', '/etc/passwd', 'photos//x.png', 'photos/./x.png', '']) {
      await expect(store.put(key, TINY_PNG, { what: 'the photo' }), key).rejects.toMatchObject({ code: 'not_found' });
    }
    expect(fs.existsSync(path.join(dir, '..', 'escape.png'))).toBe(false);
  });
});

describe('an S3-compatible store that does not answer', () => {
  it('fails writes and reads with 503 in plain words, and its health with the reason', async () => {
    const store = openObjectStore(loadConfig(s3.env));
    await store.put('photos/kept.png', TINY_PNG, { what: 'the photo' });
    await s3.stop();

    const put = await store.put('photos/new.png', TINY_PNG, { what: 'the photo' }).catch((e: unknown) => e);
    expect(put).toBeInstanceOf(HttpError);
    expect(put).toMatchObject({ status: 503, code: 'storage_unavailable' });
    expect((put as Error).message).toMatch(/cannot reach its file store just now, so the photo was not saved/);
    expect((put as Error).message).not.toMatch(/ECONNREFUSED|127\.0\.0\.1/);

    const get = await store.get('photos/kept.png', 'the photo').catch((e: unknown) => e);
    expect(get).toMatchObject({ status: 503, code: 'storage_unavailable' });
    expect((get as Error).message).toMatch(/cannot read the photo/);

    await expect(store.health()).rejects.toThrow(/the file store does not answer/);

    await s3.start();
    expect((await readAll((await store.get('photos/kept.png'))!)).equals(TINY_PNG)).toBe(true);
  });

  it('names a missing bucket in its health', async () => {
    const store = openObjectStore(loadConfig({ ...s3.env, S3_BUCKET: 'no-such-bucket' }));
    await expect(store.health()).rejects.toThrow('the bucket no-such-bucket does not exist');
  });
});

describe('the S3 settings', () => {
  it('refuse an endpoint or key without a bucket, and a key without its secret', () => {
    expect(() => loadConfig({ S3_ENDPOINT: 'http://files.example.test' })).toThrow(/S3_BUCKET: set it too/);
    expect(() => loadConfig({ S3_BUCKET: 'b', S3_ACCESS_KEY_ID: 'k' })).toThrow(/S3_ACCESS_KEY_ID and S3_SECRET_ACCESS_KEY go together/);
    expect(() => loadConfig({ S3_BUCKET: 'b', S3_PREFIX: 'no-slash' })).toThrow(/S3_PREFIX must be empty or end in "\/"/);
    expect(openObjectStore(loadConfig({ UPLOADS_DIR: dir })).kind).toBe('disk');
    expect(openObjectStore(loadConfig({ ...s3.env })).kind).toBe('s3');
  });
});

describe('the app with an S3-compatible store', () => {
  let t: TestApp;
  let uploads: string;
  beforeEach(async () => {
    uploads = fs.mkdtempSync(path.join(os.tmpdir(), 'crowntip-s3-uploads-'));
    const c = loadConfig({ ...s3.env, S3_PREFIX: `app${randomUUID().slice(0, 8)}/` });
    const { S3_BUCKET, S3_ENDPOINT, S3_REGION, S3_ACCESS_KEY_ID, S3_SECRET_ACCESS_KEY, S3_PREFIX } = c;
    t = await createTestApp({ S3_BUCKET, S3_ENDPOINT, S3_REGION, S3_ACCESS_KEY_ID, S3_SECRET_ACCESS_KEY, S3_PREFIX, UPLOADS_DIR: uploads });
  });
  afterEach(async () => {
    await t.close();
    fs.rmSync(uploads, { recursive: true, force: true });
  });

  async function walkOfSampler() {
    const sampler = await signInApi(t.app, 'sampler@crowntip.test');
    const today = todayIso();
    const planting = at(await duePlantings(t.db, ORG1, { season: seasonOfDate(today), today }), 0, 'due planting');
    const res = await sampler.agent
      .post('/api/walks')
      .set('X-CSRF-Token', sampler.csrf)
      .send({ id: randomUUID(), plantingId: planting.plantingId, walkedOn: today, stage: 'Z31', plants: [1, 2, 3].map((stop) => ({ stop, lengthCm: 80 + stop })) });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    const upload = (stop = 1) => sampler.agent.post(`/api/walks/${res.body.id}/photos`).set('X-CSRF-Token', sampler.csrf).field('stop', String(stop)).attach('photo', TINY_PNG, 'stop.png');
    return { sampler, walkId: res.body.id as string, upload };
  }

  const keysOf = async () => (await s3.keys(t.config.S3_PREFIX)).map((k) => k.slice(t.config.S3_PREFIX.length));

  it('keeps a photo in the bucket, not on disk, and serves it only through the app to its organisation', async () => {
    const ready = await signInApi(t.app, 'clerk@crowntip.test').then((c) => c.agent.get('/readyz'));
    expect(ready.body).toEqual({ ok: true, checks: { database: 'ok', storage: 'ok' } });

    const { sampler, walkId, upload } = await walkOfSampler();
    const res = await upload();
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    const row = await t.db('walk_photos').where('id', res.body.id).first();
    expect(await keysOf()).toEqual([row.path]);
    expect((await s3.read(t.config.S3_PREFIX + row.path)).equals(TINY_PNG)).toBe(true);
    expect(fs.readdirSync(uploads)).toEqual([]);

    const got = await sampler.agent.get(res.body.url).buffer(true);
    expect(got.status).toBe(200);
    expect(got.headers['content-type']).toBe('image/png');
    expect(got.headers['cache-control']).toBe('no-store');
    expect(got.headers['content-length']).toBe(String(TINY_PNG.length));
    expect(Buffer.from(got.body).equals(TINY_PNG)).toBe(true);

    const other = await signInApi(t.app, 'clerk@quillwater.test');
    expect((await other.agent.get(res.body.url)).status).toBe(404);
    expect((await request401(res.body.url)).status).toBe(401);

    // A second photo for the stop replaces the first, in the bucket too.
    expect((await upload()).status).toBe(201);
    const rows = await t.db('walk_photos').where({ walk_id: walkId, stop: 1 });
    expect(rows).toHaveLength(1);
    expect(await keysOf()).toEqual([rows[0].path]);
  });

  const request401 = (url: string) => import('supertest').then(({ default: request }) => request(t.app).get(url));

  it('keeps registry import uploads in the bucket, so any server can preview them', async () => {
    const clerk = await signInPages(t.app, 'clerk@crowntip.test');
    const csrf = csrfFromHtml((await clerk.get('/registry/import')).text);
    const up = await clerk
      .post('/registry/import/preview')
      .set('X-CSRF-Token', csrf)
      .set('Accept', 'application/json')
      .attach('file', Buffer.from('Ranch,Field,Crop\nNorth,1,cereal_rye\n'), { filename: 'p.csv', contentType: 'text/csv' });
    expect(up.status, JSON.stringify(up.body)).toBe(201);
    expect(await keysOf()).toEqual([`imports/${up.body.id}.csv`, `imports/${up.body.id}.json`]);
    expect(fs.readdirSync(uploads)).toEqual([]);
    const preview = await clerk.get(up.body.previewUrl);
    expect(preview.status).toBe(200);
    expect(preview.text).toContain('p.csv');
  });

  it('answers 503 in plain words while the store is down, keeps no row, and works once it is back', async () => {
    const { sampler, walkId, upload } = await walkOfSampler();
    const first = await upload(2);
    expect(first.status).toBe(201);
    await s3.stop();

    const ready = await sampler.agent.get('/readyz');
    expect(ready.status).toBe(503);
    expect(ready.body.checks).toMatchObject({ database: 'ok' });
    expect(ready.body.checks.storage).toMatch(/file store does not answer/);

    const res = await upload(1);
    expect(res.status, JSON.stringify(res.body)).toBe(503);
    expect(res.body.error.code).toBe('storage_unavailable');
    expect(res.body.error.message).toMatch(/so the photo was not saved\. Nothing was kept/);
    expect(await t.db('walk_photos').where({ walk_id: walkId, stop: 1 })).toEqual([]);

    const read = await sampler.agent.get(first.body.url);
    expect(read.status).toBe(503);
    expect(read.body.error.message).toMatch(/cannot read the photo/);

    await s3.start();
    expect((await sampler.agent.get('/readyz')).status).toBe(200);
    expect((await upload(1)).status).toBe(201);
    expect((await sampler.agent.get(first.body.url)).status).toBe(200);
  });
});
