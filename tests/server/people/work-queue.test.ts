import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { createTestApp, signInPages, type TestApp } from '../../helpers/app';
import { workQueue } from '../../../server/people/work-queue-db';
import { DEMO_ORGANISATIONS, DEMO_USERS } from '../../../seeds/demo-people';
import { addDaysIso } from '../../../shared/registry/season';
import { at, only } from '../../helpers/lists';

let t: TestApp;
const TODAY = '2027-02-20'; // reporting year 2027 (season 2026-27)
const ORG = DEMO_ORGANISATIONS[0].id;
const userId = (email: string) => DEMO_USERS.find((u) => u.email === email)!.id;
const SAMPLER = () => userId('sampler@crowntip.test');
let n = 0;

beforeEach(async () => {
  t = await createTestApp();
  // A known starting point: no walks, no assignments, no registers, nothing planned or ended.
  await t.db('walk_assignments').del();
  await t.db('walk_plants').del();
  await t.db('walk_photos').del();
  await t.db('walk_tissue_n_log').del();
  await t.db('field_walks').del();
  await t.db('registers').update({ previous_id: null });
  await t.db('registers').del();
  await t.db('plantings').update({ planned_termination_on: null, terminated_on: null });
});
afterEach(async () => {
  await t.close();
});

/** The ids of the organisation's first `count` plantings (by id), as a tuple of that length. */
async function plantings<N extends number>(count: N): Promise<Tuple<string, N>> {
  const rows = await t.db('plantings').where('organisation_id', ORG).orderBy('id').limit(count).select('id');
  expect(rows).toHaveLength(count);
  return rows.map((r) => r.id) as Tuple<string, N>;
}
type Tuple<T, N extends number, Acc extends T[] = []> = Acc['length'] extends N ? Acc : Tuple<T, N, [...Acc, T]>;

async function walk(plantingId: string, status: string, walkedOn: string) {
  n += 1;
  await t.db('field_walks').insert({
    id: `00000000-0000-4000-8000-${String(n).padStart(12, '0')}`,
    organisation_id: ORG,
    planting_id: plantingId,
    sampler_id: SAMPLER(),
    walked_on: walkedOn,
    status,
    content_hash: 'x',
    created_at: new Date().toISOString(),
  });
}

const plan = (id: string, days: number) => t.db('plantings').where('id', id).update({ planned_termination_on: addDaysIso(TODAY, days) });
const assign = (id: string, days: number) =>
  t.db('walk_assignments').insert({ organisation_id: ORG, planting_id: id, sampler_id: SAMPLER(), due_on: addDaysIso(TODAY, days), created_at: new Date().toISOString() });

describe('the office work queue', () => {
  it('counts walks to review, plantings due soon and overdue, and unfinalised registers', async () => {
    const [p1, p2, p3, p4, p5, p6, p7, p8, p9, p10] = await plantings(10);
    // Due soon (today .. today+14, both ends counted): p1 planned +5; p3 planned +40 but assigned
    // due +10 (the due-by date wins); p6 planned +14 (last day in the window); p10 planned today.
    await plan(p1, 5);
    await plan(p3, 40);
    await assign(p3, 10);
    await plan(p6, 14);
    await plan(p10, 0);
    // Not counted: p2 planned +3 but walked and approved; p7 planned +15 (outside); p8 planned +2
    // but its walk is submitted (it is in the review list instead).
    await plan(p2, 3);
    await walk(p2, 'approved', addDaysIso(TODAY, -1));
    await plan(p7, 15);
    await plan(p8, 2);
    await walk(p8, 'submitted', addDaysIso(TODAY, -4));
    // Overdue: p4 planned termination two days ago, not terminated; p5 planned +30 but assigned due yesterday.
    await plan(p4, -2);
    await plan(p5, 30);
    await assign(p5, -1);
    // p9: a draft walk does not take a planting off the queue, and a second submitted walk to review
    // (walked earlier, so it is the oldest).
    await plan(p9, -5);
    await walk(p9, 'draft', addDaysIso(TODAY, -3));
    const pOther = only(await t.db('plantings').where('organisation_id', ORG).whereNotIn('id', [p1, p2, p3, p4, p5, p6, p7, p8, p9, p10]).limit(1).pluck('id'), 'other planting');
    await walk(pOther, 'submitted', addDaysIso(TODAY, -9));
    // A terminated planting is never due.
    await t.db('plantings').where('id', pOther).update({ planned_termination_on: addDaysIso(TODAY, 1), terminated_on: addDaysIso(TODAY, -1) });

    // Registers: one ranch finalised for 2027, another only for 2026 (still a 2027 draft).
    const ranches = await t.db('ranches').where('organisation_id', ORG).orderBy('id').pluck('id');
    expect(ranches.length).toBeGreaterThanOrEqual(2);
    const [finalised, draft] = [at(ranches, 0), at(ranches, 1)];
    const reg = (ranchId: string, year: number) =>
      t.db('registers').insert({
        id: `10000000-0000-4000-8000-${String(year)}${ranchId.slice(0, 8)}`.slice(0, 36),
        organisation_id: ORG,
        ranch_id: ranchId,
        year,
        version: 1,
        snapshot: '{}',
        content_hash: 'h',
        finalised_by_name: 'Test Clerk',
        finalised_at: new Date().toISOString(),
      });
    await reg(finalised, 2027);
    await reg(draft, 2026);

    const q = await workQueue(t.db, ORG, TODAY);
    expect(q.reportingYear).toBe(2027);
    expect(q.toReview).toEqual({ count: 2, oldestWalkedOn: addDaysIso(TODAY, -9) });
    expect(q.dueSoon.count).toBe(4); // p1, p3, p6, p10
    expect(q.overdue.count).toBe(3); // p4, p5, p9
    expect(q.draftRegisters.count).toBe(ranches.length - 1);

    // Another organisation's queue is its own.
    const other = await workQueue(t.db, DEMO_ORGANISATIONS[1].id, TODAY);
    expect(other.toReview.count).toBe(0);
    expect(other.dueSoon.count).toBe(0);
  });

  it('shows the queue with links for a clerk, read-only wording for an auditor, and sends a sampler to the phone', async () => {
    const [p1] = await plantings(1);
    await walk(p1, 'submitted', '2026-11-02');
    const clerk = await signInPages(t.app, 'clerk@crowntip.test');
    const page = await clerk.get('/office');
    expect(page.status).toBe(200);
    expect(page.text).toContain('Work to do');
    expect(page.text).toMatch(/data-queue="review"[\s\S]*?data-count>1</);
    expect(page.text).toContain('href="/walks?status=submitted">Review walks, oldest first');
    // Nothing planned: the empty state says what to do next.
    expect(page.text).toContain('No planting is due in the next 14 days. Set planned termination dates');

    const auditor = await signInPages(t.app, 'auditor@crowntip.test');
    const ro = await auditor.get('/office');
    expect(ro.text).toContain('href="/walks?status=submitted">Open the walks');
    expect(ro.text).not.toContain('Review walks, oldest first');

    const sampler = await signInPages(t.app, 'sampler@crowntip.test');
    const res = await sampler.get('/office');
    expect(res.status).toBe(302);
    expect(res.headers.location).toBe('/capture');
  });

  it('counts the imports and register builds running or waiting, on any server, with links to follow them', async () => {
    const job = (id: string, kind: string, state: string, extra: Record<string, unknown> = {}) =>
      t.db('jobs').insert({ id, kind, state, organisation_id: ORG, payload: '{}', max_attempts: 1, created_at: new Date(Date.now() - 1000 * Number(id.slice(-1))).toISOString(), ...extra });
    const upload = 'a'.repeat(32);
    // Running: one import (newest), one queued import, one build of 2026; not counted: a finished
    // import, a failed build, and another organisation's running build.
    await job('00000000-0000-4000-8000-000000000001', 'registry-import', 'running', { subject: upload });
    await job('00000000-0000-4000-8000-000000000002', 'registry-import', 'queued', { subject: 'b'.repeat(32) });
    await job('00000000-0000-4000-8000-000000000003', 'register-build', 'running', { payload: JSON.stringify({ organisationId: ORG, year: 2026 }) });
    await job('00000000-0000-4000-8000-000000000004', 'registry-import', 'done', { subject: 'c'.repeat(32) });
    await job('00000000-0000-4000-8000-000000000005', 'register-build', 'failed');
    await job('00000000-0000-4000-8000-000000000006', 'register-build', 'running', { organisation_id: DEMO_ORGANISATIONS[1].id });

    const q = await workQueue(t.db, ORG, TODAY);
    expect(q.imports).toEqual({ count: 2, latest: { id: '00000000-0000-4000-8000-000000000001', uploadId: upload } });
    expect(q.registerBuilds).toEqual({ count: 1, latest: { id: '00000000-0000-4000-8000-000000000003', year: 2026 } });

    const clerk = await signInPages(t.app, 'clerk@crowntip.test');
    const page = await clerk.get('/office');
    expect(page.text).toMatch(/data-queue="running-jobs"[\s\S]*?data-count>3</);
    expect(page.text).toContain('2 registry imports, 1 register build');
    expect(page.text).toContain(`href="/registry/import/${upload}">Follow the import`);
    expect(page.text).toContain('href="/registers?year=2026&amp;job=00000000-0000-4000-8000-000000000003#organisation-register">Follow the register build');

    // Once they end, the card says nothing runs and where to start one.
    await t.db('jobs').update({ state: 'done' });
    const empty = await clerk.get('/office');
    expect(empty.text).toMatch(/data-queue="running-jobs"[\s\S]*?data-count>0</);
    expect(empty.text).toContain('Nothing is running. Imports start from');
  });
});
