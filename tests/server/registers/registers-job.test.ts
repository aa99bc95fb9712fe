import { randomUUID } from 'node:crypto';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import bcrypt from 'bcryptjs';
import { parse } from 'csv-parse/sync';
import { extractText, getDocumentProxy } from 'unpdf';
import { createTestApp, csrfFromHtml, DEMO_PASSWORD, signInApi, signInPages, type TestApp, locationOf } from '../../helpers/app';
import { estimateSnapshot, YEAR, SEASON } from '../../helpers/register-scenario';
import { acToHa } from '../../../shared/calc/units';

/*
 * The organisation's register as a background job: a new organisation of its own with 10 ranches ×
 * 500 fields = 5,000 fields, a planting on every other field (2,500) and an approved walk on every
 * fourth field (1,250), so that the output holds exactly those 5,000 rows.
 */
const RANCHES = 10;
const FIELDS_PER_RANCH = 500;

let t: TestApp;
const orgId = randomUUID();
const email = 'clerk@bigfarm.test';

async function buildBigOrganisation(db: TestApp['db']) {
  const now = new Date().toISOString();
  await db('organisations').insert({ id: orgId, name: 'Big Farm (test)', created_at: now });
  const clerkId = randomUUID();
  const samplerId = randomUUID();
  const hash = await bcrypt.hash(DEMO_PASSWORD, 4);
  const user = (id: string, mail: string, role: string) => ({
    id,
    organisation_id: orgId,
    name: role === 'clerk' ? 'Bea Largefield' : 'Sam Pler',
    email: mail,
    password_hash: hash,
    role,
    active: true,
    units: 'us',
    language: 'en',
    created_at: now,
    updated_at: now,
  });
  await db('users').insert([user(clerkId, email, 'clerk'), user(samplerId, 'sampler@bigfarm.test', 'sampler')]);
  const ranches: Record<string, unknown>[] = [];
  const fields: Record<string, unknown>[] = [];
  const plantings: Record<string, unknown>[] = [];
  const walks: Record<string, unknown>[] = [];
  for (let r = 0; r < RANCHES; r++) {
    const ranchId = randomUUID();
    ranches.push({ id: ranchId, organisation_id: orgId, name: `Ranch ${String(r + 1).padStart(2, '0')}`, created_at: now, updated_at: now });
    for (let f = 0; f < FIELDS_PER_RANCH; f++) {
      const fieldId = randomUUID();
      fields.push({ id: fieldId, organisation_id: orgId, ranch_id: ranchId, name: `Field ${String(f + 1).padStart(3, '0')}`, area_ha: acToHa(5 + (f % 20)), created_at: now, updated_at: now });
      if (f % 2 === 0) {
        const plantingId = randomUUID();
        plantings.push({ id: plantingId, organisation_id: orgId, field_id: fieldId, season: SEASON, crop: 'cereal_rye', seeded_on: '2024-10-15', terminated_on: '2025-03-20', created_at: now, updated_at: now });
        if (f % 4 === 0) {
          walks.push({
            id: randomUUID(),
            organisation_id: orgId,
            planting_id: plantingId,
            sampler_id: samplerId,
            walked_on: '2025-03-05',
            status: 'approved',
            content_hash: 'test',
            estimate: JSON.stringify(estimateSnapshot(f % 8 === 0 ? 6000 : 4000)),
            created_at: now,
            reviewed_at: now,
          });
        }
      }
    }
  }
  await db.batchInsert('ranches', ranches, 200);
  await db.batchInsert('fields', fields, 200);
  await db.batchInsert('plantings', plantings, 200);
  await db.batchInsert('field_walks', walks, 200);
}

beforeEach(async () => {
  t = await createTestApp();
  await buildBigOrganisation(t.db);
}, 60_000);
afterEach(async () => {
  await t.close();
});

describe('the organisation’s register as a background job', () => {
  it('builds 5,000 fields with progress from 0 to 100 % and serves the CSV and PDF', async () => {
    const { agent, csrf } = await signInApi(t.app, email);
    const started = performance.now();
    const post = await agent.post('/registers/jobs').set('X-CSRF-Token', csrf).set('Accept', 'application/json').type('form').send({ year: String(YEAR) });
    expect(post.status).toBe(202);
    expect(post.body.phase).toBe('queued');
    expect(post.body.percent).toBe(0);
    const seen: number[] = [post.body.percent];
    const phases = new Set<string>([post.body.phase]);
    let status = post.body;
    // Polling while the job runs also shows that the server keeps answering between chunks.
    while (status.phase !== 'done' && status.phase !== 'failed') {
      await new Promise((resolve) => setTimeout(resolve, 20));
      const res = await agent.get(post.body.statusUrl);
      expect(res.status).toBe(200);
      status = res.body;
      seen.push(status.percent);
      phases.add(status.phase);
    }
    const elapsed = performance.now() - started;
    expect(status.phase).toBe('done');
    expect(status.percent).toBe(100);
    expect(status.fieldsTotal).toBe(5000);
    expect(status.fieldsComputed).toBe(5000);
    expect(status.fieldsWritten).toBe(5000);
    expect(phases).toContain('computing');
    expect(phases).toContain('writing');
    // Progress only goes up, and was seen between the ends.
    expect([...seen].sort((a, b) => a - b)).toEqual(seen);
    expect(seen.some((p) => p > 0 && p < 100)).toBe(true);
    console.log(`5,000-field register job: ${Math.round(elapsed)} ms wall, ${status.elapsedMs} ms in the job, ${seen.length} status polls, progress seen: ${[...new Set(seen)].join(', ')}`);

    expect(status.result).toMatchObject({ ranches: 10, rows: 5000 });
    // 1,250 walked plantings (f ≡ 0 mod 4: 125 per ranch); those with f ≡ 0 mod 8 (63 per ranch,
    // 630 in all) reached 6,000 kg/ha, the others 4,000 (below); all are 156 days in the
    // window with the walk 15 days before termination. Areas cycle 5..24 ac by field number, and the
    // eligible fields (number f ≡ 0 mod 8, so f mod 20 ∈ {0, 8, 16, 4, 12}) repeat every 40 fields.
    const csv = await agent.get(status.result.csvUrl);
    expect(csv.status).toBe(200);
    const records: Record<string, string>[] = parse(csv.text.replace(/^\uFEFF/, ''), { columns: true });
    const fieldRows = records.filter((r) => r.field !== 'TOTAL');
    expect(fieldRows).toHaveLength(5000);
    expect(records.filter((r) => r.field === 'TOTAL')).toHaveLength(10);
    expect(fieldRows.filter((r) => r.credit_status === 'eligible')).toHaveLength(630);
    expect(fieldRows.filter((r) => r.credit_status === 'no_planting')).toHaveLength(2500);
    // Per ranch: f = 0, 8, …, 496 (63 fields); acres 5 + (f mod 20): each block of 40 fields gives
    // 5+13+21+9+17 = 65 ac; 12 blocks (f < 480) = 780 ac, plus f = 480, 488, 496 → 5+13+21 = 39 ac:
    // 819 ac per ranch × 10 ranches × 50 lb N/ac (the typical values: this organisation set no rule).
    const creditLb = records.filter((r) => r.field === 'TOTAL').reduce((n, r) => n + Number(r.credit_lb_n), 0);
    expect(creditLb).toBeCloseTo(819 * 10 * 50, 1);

    // The overview computes every ranch's draft on each view: time it at this size.
    const pages = await signInPages(t.app, email);
    const before = performance.now();
    const overview = await pages.get(`/registers?year=${YEAR}`);
    expect(overview.status).toBe(200);
    expect(overview.text).toContain('Ranch 10');
    console.log(`overview page of 5,000 fields: ${Math.round(performance.now() - before)} ms`);

    const pdf = await agent.get(status.result.pdfUrl).buffer(true).parse((r, cb) => {
      const chunks: Buffer[] = [];
      r.on('data', (c: Buffer) => chunks.push(c));
      r.on('end', () => cb(null, Buffer.concat(chunks)));
    });
    expect(pdf.status).toBe(200);
    const bytes = pdf.body as Buffer;
    expect(bytes.subarray(0, 5).toString()).toBe('%PDF-');
    const doc = await getDocumentProxy(new Uint8Array(bytes));
    expect(doc.numPages).toBeGreaterThan(50);
    console.log(`organisation PDF: ${doc.numPages} pages, ${bytes.length} bytes`);
    const { text } = await extractText(doc, { mergePages: true });
    expect(text).toContain('Credit registers 2025');
    expect(text).toContain('Ranch 10');
    expect(text).toContain('Field 500');
  }, 120_000);

  it('shows the job on the page without script, keeps it to its organisation, and 404s when unknown', async () => {
    const pages = await signInPages(t.app, email);
    const page = await pages.get(`/registers?year=${YEAR}`);
    const token = csrfFromHtml(page.text);
    const posted = await pages.post('/registers/jobs').type('form').send({ _csrf: token, year: String(YEAR) });
    expect(posted.status).toBe(303);
    expect(posted.headers.location).toMatch(new RegExp(`^/registers\\?year=${YEAR}&job=[0-9a-f-]+#organisation-register$`));
    const jobId = new URL(locationOf(posted), 'http://x').searchParams.get('job')!;
    const followed = await pages.get(locationOf(posted));
    expect(followed.text).toContain('<progress');
    expect(followed.text).toContain(`data-register-job-status="/registers/jobs/${jobId}"`);

    const other = await signInApi(t.app, 'clerk@crowntip.test');
    expect((await other.agent.get(`/registers/jobs/${jobId}`)).status).toBe(404);
    expect((await other.agent.get(`/registers/jobs/${jobId}.csv`)).status).toBe(404);
    expect((await pages.get('/registers/jobs/nope')).status).toBe(404);
    const sampler = await signInPages(t.app, 'sampler@bigfarm.test');
    expect((await sampler.get(`/registers/jobs/${jobId}`)).status).toBe(403);
    const bad = await pages.post('/registers/jobs').set('Accept', 'application/json').set('X-CSRF-Token', token).type('form').send({ year: 'soon' });
    expect(bad.status).toBe(400);
    // Let the job finish before the database closes.
    for (let i = 0; i < 600; i++) {
      const res = await pages.get(`/registers/jobs/${jobId}`);
      if (res.body.phase === 'done') break;
      await new Promise((resolve) => setTimeout(resolve, 50));
    }
  }, 120_000);
});
