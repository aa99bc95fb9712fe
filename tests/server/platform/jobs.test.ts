import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { pino } from 'pino';
import { createTestApp, signInApi, testEngine, type TestApp } from '../../helpers/app';
import { createJobQueue, type JobContext } from '../../../server/platform/jobs';
import { DEMO_ORGANISATIONS } from '../../../seeds/demo-people';
import { at } from '../../helpers/lists';

/*
 * The job queue (server/platform/jobs.ts) on this run's engine: in-process on SQLite, pg-boss in
 * the postgres project. Two app servers share one database; what one queues, the other reads.
 */
const ORG = DEMO_ORGANISATIONS[0].id;
const OTHER_ORG = DEMO_ORGANISATIONS[1].id;
let a: TestApp;
let b: TestApp;

beforeEach(async () => {
  a = await createTestApp();
  b = await createTestApp({}, { sameDatabaseAs: a });
});
afterEach(async () => {
  await b.close();
  await a.close();
});

const echo = async (job: JobContext<{ rows: number }, { done: number }>) => {
  for (let done = 0; done <= job.payload.rows; done += 50) await job.progress({ done });
  await job.output('csv', 'text/csv', Buffer.from(`rows\n${job.payload.rows}\n`));
  return { rows: job.payload.rows };
};

describe('background jobs', () => {
  it('reads on server B the state, progress, result and file of a job queued on server A', async () => {
    a.jobs.define('test-echo', echo);
    b.jobs.define('test-echo', echo);
    const { id, created } = await a.jobs.enqueue('test-echo', { rows: 200 }, { organisationId: ORG });
    expect(created).toBe(true);
    const queued = await b.jobs.get(id, ORG);
    expect(['queued', 'running', 'done']).toContain(queued!.state);
    const done = await b.jobs.waitFor<unknown, { done: number }, { rows: number }>(id, ORG, 20_000);
    expect(done).toMatchObject({ state: 'done', attempts: 1, result: { rows: 200 }, progress: { done: 200 }, error: null });
    const file = await b.jobs.output(id, ORG, 'csv');
    expect(file?.data.toString()).toBe('rows\n200\n');
    // Another organisation learns nothing of it.
    expect(await b.jobs.get(id, OTHER_ORG)).toBeUndefined();
    expect(await b.jobs.output(id, OTHER_ORG, 'csv')).toBeUndefined();
    expect(await a.jobs.active(ORG)).toEqual({});
  });

  it('retries a failed attempt, and records the failure once every attempt has failed', async () => {
    let calls = 0;
    a.jobs.define(
      'test-flaky',
      async (job) => {
        calls += 1;
        if (job.attempt === 1) throw new Error('the first attempt fails');
        return { attempt: job.attempt };
      },
      { retries: 2, retryDelaySeconds: 0 },
    );
    a.jobs.define(
      'test-broken',
      async () => {
        throw new Error('the worker is broken');
      },
      { retries: 1, retryDelaySeconds: 0 },
    );
    const flaky = await a.jobs.enqueue('test-flaky', {}, { organisationId: ORG });
    const broken = await a.jobs.enqueue('test-broken', {}, { organisationId: ORG });
    expect(await a.jobs.waitFor(flaky.id, ORG, 20_000)).toMatchObject({ state: 'done', attempts: 2, result: { attempt: 2 } });
    expect(calls).toBe(2);
    // 1 attempt + 1 retry, then failed for good with the worker's message.
    expect(await a.jobs.waitFor(broken.id, ORG, 20_000)).toMatchObject({ state: 'failed', attempts: 2, maxAttempts: 2, error: 'the worker is broken' });
  });

  it('makes one job for a key held for ever, however many servers ask at once', async () => {
    let runs = 0;
    const once = async () => {
      runs += 1;
      return null;
    };
    a.jobs.define('test-once', once);
    b.jobs.define('test-once', once);
    const asks = await Promise.all([a, b, a, b].map((s) => s.jobs.enqueue('test-once', {}, { key: 'test-once:2027-02-20', keyHeld: 'forever' })));
    expect(asks.filter((x) => x.created)).toHaveLength(1);
    expect(new Set(asks.map((x) => x.id)).size).toBe(1);
    await a.jobs.waitFor(at(asks, 0).id, null, 20_000);
    // Asked again once done: still that one job.
    expect((await b.jobs.enqueue('test-once', {}, { key: 'test-once:2027-02-20', keyHeld: 'forever' })).created).toBe(false);
    expect(runs).toBe(1);
    // A key held only while active is free again once the job ends.
    const first = await a.jobs.enqueue('test-once', {}, { key: 'test-while' });
    await a.jobs.waitFor(first.id, null, 20_000);
    expect((await a.jobs.enqueue('test-once', {}, { key: 'test-while' })).created).toBe(true);
  });

  it('shows a register build started on A with its progress on B, and serves its files from B', async () => {
    const onA = await signInApi(a.app, 'clerk@crowntip.test');
    const onB = await signInApi(b.app, 'clerk@crowntip.test');
    const post = await onA.agent.post('/registers/jobs').set('X-CSRF-Token', onA.csrf).set('Accept', 'application/json').type('form').send({ year: '2025' });
    expect(post.status).toBe(202);
    let status = post.body;
    for (let i = 0; i < 400 && status.phase !== 'done' && status.phase !== 'failed'; i++) {
      await new Promise((r) => setTimeout(r, 50));
      status = (await onB.agent.get(post.body.statusUrl)).body;
    }
    expect(status).toMatchObject({ phase: 'done', percent: 100 });
    const csv = await onB.agent.get(status.result.csvUrl);
    expect(csv.status).toBe(200);
    expect(csv.headers['content-disposition']).toContain('crowntip-registers-2025.csv');
    expect(csv.text).toContain('TOTAL');
    const pdf = await onB.agent.get(status.result.pdfUrl).buffer(true);
    expect(pdf.status).toBe(200);
    expect(Buffer.from(pdf.body).subarray(0, 5).toString()).toBe('%PDF-');
  });
});

describe.skipIf(testEngine() === 'postgres')('the in-process queue (SQLite, one server)', () => {
  it('takes up at start the jobs a stopped process left queued', async () => {
    const logger = pino({ level: 'silent' });
    const before = createJobQueue(a.db, { logger });
    // Queued while no worker for the kind runs here (as if the process stopped before it started).
    const { id } = await before.enqueue('test-left', { n: 1 }, { organisationId: ORG });
    await before.stop(0);
    const after = createJobQueue(a.db, { logger });
    after.define('test-left', async (job: JobContext<{ n: number }>) => ({ n: job.payload.n + 1 }));
    await after.start();
    expect(await after.waitFor(id, ORG, 5000)).toMatchObject({ state: 'done', result: { n: 2 } });
    await after.stop(0);
  });

  it('lets a running job finish on stop, and takes no new one', async () => {
    let release!: () => void;
    const gate = new Promise<void>((r) => (release = r));
    a.jobs.define('test-slow', async () => {
      await gate;
      return 'finished';
    });
    const first = await a.jobs.enqueue('test-slow', {}, { organisationId: ORG });
    for (let i = 0; i < 100 && (await a.jobs.get(first.id, ORG))!.state !== 'running'; i++) await new Promise((r) => setTimeout(r, 10));
    const second = await a.jobs.enqueue('test-slow', {}, { organisationId: ORG });
    const stopped = a.jobs.stop(5000);
    release();
    await stopped;
    expect((await a.jobs.get(first.id, ORG))!.state).toBe('done');
    expect((await a.jobs.get(second.id, ORG))!.state).toBe('queued');
  });
});
