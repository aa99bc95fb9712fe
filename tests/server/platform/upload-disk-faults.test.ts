import { randomUUID } from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { Writable } from 'node:stream';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { createTestApp, csrfFromHtml, signInApi, signInPages, type TestApp } from '../../helpers/app';
import { fileSystem } from '../../../server/platform/file-store';
import { duePlantings } from '../../../server/walks/db';
import { seasonOfDate, todayIso } from '../../../shared/registry/season';
import { DEMO_ORGANISATIONS } from '../../../seeds/demo-people';
import { at } from '../../helpers/lists';

// Uploads when the disk misbehaves: a full disk (ENOSPC), a read-only one (EROFS) and a folder the
// server may not write. Each must answer 507 or 503 in plain words and leave neither a file
// without its row nor a row without its file; the next upload, once the disk is back, succeeds.

const ORG1 = DEMO_ORGANISATIONS[0].id;
/** A real 1 × 1 PNG. */
const TINY_PNG = Buffer.from('iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAIAAACQd1PeAAAADElEQVR4nGPwqtEDAAIIAPXOsRDEAAAAAElFTkSuQmCC', 'base64');

let t: TestApp;
let uploads: string;
beforeEach(async () => {
  uploads = fs.mkdtempSync(path.join(os.tmpdir(), 'crowntip-faults-'));
  t = await createTestApp({ UPLOADS_DIR: uploads });
});
afterEach(async () => {
  vi.restoreAllMocks();
  await t.close();
  fs.chmodSync(uploads, 0o700);
  fs.rmSync(uploads, { recursive: true, force: true });
});

/**
 * A write stream that behaves like a disk failing mid-write: the first half of the first chunk
 * really lands in the file (a partial file, as a full disk leaves), then the write fails with `code`.
 */
function failingDisk(code: string) {
  vi.spyOn(fileSystem, 'openWrite').mockImplementation((file: string) => {
    return new Writable({
      write(chunk: Buffer, _enc, callback) {
        fs.writeFileSync(file, chunk.subarray(0, Math.ceil(chunk.length / 2)));
        callback(Object.assign(new Error(`${code}: simulated`), { code }));
      },
    });
  });
}

/** Every file under a folder, as paths relative to it. */
function filesUnder(dir: string): string[] {
  if (!fs.existsSync(dir)) return [];
  return (fs.readdirSync(dir, { recursive: true }) as string[]).filter((p) => fs.statSync(path.join(dir, p)).isFile());
}

async function walkOfSampler() {
  const sampler = await signInApi(t.app, 'sampler@crowntip.test');
  const today = todayIso();
  const planting = at(await duePlantings(t.db, ORG1, { season: seasonOfDate(today), today }), 0, 'due planting');
  const res = await sampler.agent
    .post('/api/walks')
    .set('X-CSRF-Token', sampler.csrf)
    .send({ id: randomUUID(), plantingId: planting.plantingId, walkedOn: today, stage: 'Z31', plants: [1, 2, 3].map((stop) => ({ stop, lengthCm: 80 + stop })) });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  const upload = () => sampler.agent.post(`/api/walks/${res.body.id}/photos`).set('X-CSRF-Token', sampler.csrf).field('stop', '1').attach('photo', TINY_PNG, 'stop.png');
  return { walkId: res.body.id as string, upload };
}

describe('photo uploads under disk faults', () => {
  it.each([
    ['ENOSPC', 507, 'storage_full', /disk is full/],
    ['EROFS', 503, 'storage_unavailable', /cannot write to its storage/],
  ])('%s mid-write answers %i, keeps no partial file and no row, and the next upload works', async (code, status, errorCode, wording) => {
    const { walkId, upload } = await walkOfSampler();
    failingDisk(code);
    const res = await upload();
    expect(res.status, JSON.stringify(res.body)).toBe(status);
    expect(res.body.error.code).toBe(errorCode);
    expect(res.body.error.message).toMatch(wording);
    expect(res.body.error.message).not.toMatch(/ENOSPC|EROFS|simulated/);
    expect(filesUnder(uploads)).toEqual([]);
    expect(await t.db('walk_photos').where('walk_id', walkId)).toEqual([]);

    vi.restoreAllMocks();
    const again = await upload();
    expect(again.status, JSON.stringify(again.body)).toBe(201);
    const rows = await t.db('walk_photos').where('walk_id', walkId);
    expect(rows).toHaveLength(1);
    expect(filesUnder(uploads)).toEqual([rows[0].path]);
    expect(fs.readFileSync(path.join(uploads, rows[0].path)).equals(TINY_PNG)).toBe(true);
  });

  it('a folder the server may not write answers 503 with no row', async () => {
    const { walkId, upload } = await walkOfSampler();
    // A read-only folder; root ignores the mode bits, so there the folder is a path below /sys,
    // which the kernel refuses to create files in whoever asks.
    fs.chmodSync(uploads, 0o555);
    let canWrite = true;
    try {
      fs.writeFileSync(path.join(uploads, 'probe'), 'x');
      fs.rmSync(path.join(uploads, 'probe'));
    } catch {
      canWrite = false;
    }
    if (canWrite) {
      await t.close();
      t = await createTestApp({ UPLOADS_DIR: '/sys/crowntip-uploads-test' });
      const again = await walkOfSampler();
      const res = await again.upload();
      expect(res.status, JSON.stringify(res.body)).toBe(503);
      expect(res.body.error.code).toBe('storage_unavailable');
      expect(await t.db('walk_photos').where('walk_id', again.walkId)).toEqual([]);
      expect(fs.existsSync('/sys/crowntip-uploads-test')).toBe(false);
      return;
    }
    const res = await upload();
    expect(res.status, JSON.stringify(res.body)).toBe(503);
    expect(res.body.error.code).toBe('storage_unavailable');
    expect(await t.db('walk_photos').where('walk_id', walkId)).toEqual([]);
    expect(filesUnder(uploads)).toEqual([]);
  });
});

describe('registry import uploads under disk faults', () => {
  it('a full disk answers 507 on the upload page beside the file, and leaves no file', async () => {
    const agent = await signInPages(t.app, 'clerk@crowntip.test');
    const csrf = csrfFromHtml((await agent.get('/registry/import')).text);
    failingDisk('ENOSPC');
    const csv = Buffer.from('Ranch,Field,Crop\nNorth,1,cereal_rye\n');
    const json = await agent.post('/registry/import/preview').set('X-CSRF-Token', csrf).set('Accept', 'application/json').attach('file', csv, { filename: 'p.csv', contentType: 'text/csv' });
    expect(json.status, JSON.stringify(json.body)).toBe(507);
    expect(json.body.error.code).toBe('storage_full');
    const page = await agent.post('/registry/import/preview').set('X-CSRF-Token', csrf).attach('file', csv, { filename: 'p.csv', contentType: 'text/csv' });
    expect(page.status).toBe(507);
    expect(page.text).toMatch(/disk is full/);
    expect(filesUnder(uploads)).toEqual([]);

    vi.restoreAllMocks();
    const ok = await agent.post('/registry/import/preview').set('X-CSRF-Token', csrf).set('Accept', 'application/json').attach('file', csv, { filename: 'p.csv', contentType: 'text/csv' });
    expect(ok.status, JSON.stringify(ok.body)).toBe(201);
    expect(filesUnder(uploads).sort()).toEqual([`imports/${ok.body.id}.csv`, `imports/${ok.body.id}.json`]);
  });
});
