import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { createTestApp, type TestApp } from '../helpers/app';
import { DEMO_ORGANISATIONS } from '../../seeds/demo-people';

/*
 * pg-boss between two app servers on one database: a job queued on A is worked by B, a job lost
 * with a server that stopped answering is picked up by the other once its timeout has passed,
 * and a server shutting down hands its running job back to the queue for the other.
 */
const ORG = DEMO_ORGANISATIONS[0].id;
let a: TestApp;
let b: TestApp;
const forever = () => new Promise<never>(() => {});
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

beforeEach(async () => {
  a = await createTestApp();
  b = await createTestApp({}, { sameDatabaseAs: a });
});
afterEach(async () => {
  await b.close();
  await a.close();
});

async function untilRunning(t: TestApp, id: string) {
  for (let i = 0; i < 200; i++) {
    if ((await t.jobs.get(id, ORG))?.state === 'running') return;
    await sleep(50);
  }
  throw new Error('the job never started');
}

describe('jobs across servers (pg-boss)', () => {
  it('runs on B a job queued on A, where no worker for it runs', async () => {
    b.jobs.define('test-where', async () => ({ ranOn: 'B' }));
    await b.jobs.start();
    const { id } = await a.jobs.enqueue('test-where', {}, { organisationId: ORG });
    expect(await a.jobs.waitFor(id, ORG, 20_000)).toMatchObject({ state: 'done', result: { ranOn: 'B' }, attempts: 1 });
  });

  it('hands a job lost with a server that stopped answering to the other once its timeout has passed', async () => {
    // A takes the job and hangs, as a crashed process would (its row stays "running").
    a.jobs.define('test-lost', forever, { timeoutSeconds: 2, retries: 2, retryDelaySeconds: 0 });
    const { id } = await a.jobs.enqueue('test-lost', {}, { organisationId: ORG });
    await untilRunning(a, id);
    b.jobs.define('test-lost', async (job) => ({ ranOn: 'B', attempt: job.attempt }), { timeoutSeconds: 2, retries: 2, retryDelaySeconds: 0 });
    await b.jobs.start();
    // pg-boss's supervision (every second here) fails the expired attempt and B retries it. (The
    // hung A, not crashed, may take a retry too and hang again: then B takes the next one.)
    const done = await b.jobs.waitFor<unknown, unknown, { ranOn: string; attempt: number }>(id, ORG, 25_000);
    expect(done).toMatchObject({ state: 'done', result: { ranOn: 'B' } });
    expect(done!.attempts).toBeGreaterThanOrEqual(2);
    expect(done!.result!.attempt).toBe(done!.attempts);
  }, 40_000);

  it('on shutdown, takes no new job and hands a running one that outlasts the grace time to another server', async () => {
    let aFinished = false;
    a.jobs.define(
      'test-drain',
      async () => {
        await sleep(4000);
        aFinished = true;
        return { ranOn: 'A' };
      },
      { retryDelaySeconds: 0 },
    );
    const { id } = await a.jobs.enqueue('test-drain', {}, { organisationId: ORG });
    await untilRunning(a, id);
    b.jobs.define('test-drain', async () => ({ ranOn: 'B' }), { retryDelaySeconds: 0 });
    await b.jobs.start();
    // A stops with one second of grace: its job is handed back and B finishes it.
    await a.jobs.stop(1000);
    expect(await b.jobs.waitFor(id, ORG, 20_000)).toMatchObject({ state: 'done', result: { ranOn: 'B' }, attempts: 2 });
    // A's late finish does not overwrite B's result.
    await sleep(3500);
    expect(aFinished).toBe(true);
    expect((await b.jobs.get(id, ORG))!.result).toEqual({ ranOn: 'B' });
    // Queued after A stopped: worked by B alone.
    const next = await b.jobs.enqueue('test-drain', {}, { organisationId: ORG });
    expect(await b.jobs.waitFor(next.id, ORG, 20_000)).toMatchObject({ state: 'done', result: { ranOn: 'B' } });
  }, 40_000);
});
