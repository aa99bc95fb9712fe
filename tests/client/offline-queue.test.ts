import { describe, expect, it } from 'vitest';
import {
  backoffDelay,
  classify,
  createQueue,
  DEFAULT_BACKOFF,
  hadToWait,
  newBoundaryJob,
  newJob,
  summarise,
  type QueueJob,
  type WalkJob,
  type QueueStorage,
  type QueueTransport,
} from '../../client/features/offline/queue';
import type { BoundaryProposalCreate } from '../../shared/schemas/boundary-proposals';
import type { WalkCreate } from '../../shared/schemas/walks';
import { at } from '../helpers/lists';

/** An in-memory stand-in for the IndexedDB store; values are cloned as IndexedDB would. */
function fakeStorage(): QueueStorage & { rows: Map<string, QueueJob> } {
  const rows = new Map<string, QueueJob>();
  return {
    rows,
    all: async () => [...rows.values()].map((j) => structuredClone(j)),
    put: async (job) => {
      rows.set(job.id, structuredClone(job));
    },
    remove: async (id) => {
      rows.delete(id);
    },
  };
}

class HttpFail extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
  ) {
    super(code);
  }
}

/**
 * The server as far as the queue can tell: idempotent create (201 new, 200 same content, 409
 * different content), photos replaced per stop, submit idempotent. Counts what it stores.
 */
function fakeServer() {
  const walks = new Map<string, { json: string; submitted: boolean; photos: Map<number, number> }>();
  const calls = { create: 0, photo: 0, submit: 0, propose: 0 };
  const proposals = new Map<string, string>();
  return {
    walks,
    calls,
    proposals,
    /** Like POST /api/fields/:id/boundary-proposals: 201 new, 200 the same again, 409 other content. */
    propose(fieldId: string, body: BoundaryProposalCreate) {
      calls.propose++;
      const json = JSON.stringify([fieldId, body]);
      const existing = proposals.get(body.id);
      if (existing && existing !== json) throw new HttpFail(409, 'conflict');
      proposals.set(body.id, json);
      return { status: existing ? 200 : 201 };
    },
    create(body: WalkCreate) {
      calls.create++;
      const json = JSON.stringify(body);
      const existing = walks.get(body.id);
      if (existing && existing.json !== json) throw new HttpFail(409, 'conflict');
      if (!existing) walks.set(body.id, { json, submitted: false, photos: new Map() });
      return { status: existing ? 200 : 201 };
    },
    photo(id: string, stop: number) {
      calls.photo++;
      const w = walks.get(id);
      if (!w) throw new HttpFail(404, 'not_found');
      w.photos.set(stop, (w.photos.get(stop) ?? 0) + 1);
    },
    submit(id: string) {
      calls.submit++;
      const w = walks.get(id);
      if (!w) throw new HttpFail(404, 'not_found');
      w.submitted = true;
    },
  };
}

type Mode = 'ok' | 'down' | 'lose-answer';

/** The network between phone and server: down (nothing arrives), or the answer is lost after the server acted. */
function fakeNetwork(server: ReturnType<typeof fakeServer>, plan: Mode[] = []) {
  let i = 0;
  const next = (): Mode => plan[i++] ?? 'ok';
  const through = async <T>(act: () => T): Promise<T> => {
    const mode = next();
    if (mode === 'down') throw new HttpFail(0, 'network');
    const result = act();
    if (mode === 'lose-answer') throw new HttpFail(0, 'network');
    return result;
  };
  const transport: QueueTransport = {
    createWalk: (body) => through(() => server.create(body)),
    uploadPhoto: (id, photo) => through(() => server.photo(id, photo.stop)),
    submitWalk: (id) => through(() => server.submit(id)),
    proposeBoundary: (fieldId, body) => through(() => server.propose(fieldId, body)),
  };
  return { transport, used: () => i };
}

/** A clock and timer the test moves by hand. */
function fakeClock(start = 1_000_000) {
  let t = start;
  const timers: Array<{ at: number; fn: () => void; id: number }> = [];
  let ids = 0;
  return {
    now: () => t,
    setTimer: (fn: () => void, ms: number) => {
      const id = ++ids;
      timers.push({ at: t + ms, fn, id });
      return id;
    },
    clearTimer: (h: unknown) => {
      const k = timers.findIndex((x) => x.id === h);
      if (k >= 0) timers.splice(k, 1);
    },
    pending: () => timers.map((x) => x.at - t),
    /** Jumps to the next timer and fires it; false when none is set. */
    fireNext: () => {
      if (timers.length === 0) return false;
      timers.sort((a, b) => a.at - b.at);
      const next = timers.shift()!;
      t = Math.max(t, next.at);
      next.fn();
      return true;
    },
  };
}

function walkBody(id: string, lengths = [70, 72, 75, 80, 68, 77, 79, 81, 74, 73]): WalkCreate {
  return {
    id,
    plantingId: 'planting-1',
    walkedOn: '2027-02-14',
    stage: 'Z31',
    notes: null,
    plants: lengths.map((lengthCm, k) => ({ stop: k + 1, lengthCm })),
  };
}

const uuid = (n: number) => `00000000-0000-4000-8000-${String(n).padStart(12, '0')}`;

function job(n: number, now: number, photos: number[] = [], userId = 'u1'): QueueJob {
  return newJob({
    body: walkBody(uuid(n)),
    userId,
    photos: photos.map((stop) => ({ stop, key: `${uuid(n)}:${stop}` })),
    label: { fieldName: `Field ${n}`, ranchName: 'Ranch' },
    now,
  });
}

async function settle(queue: ReturnType<typeof createQueue>, clock: ReturnType<typeof fakeClock>, maxTimers = 200) {
  await queue.run();
  for (let k = 0; k < maxTimers && clock.fireNext(); k++) await queue.run();
}

describe('a new job', () => {
  it('starts alike for a walk and a traced boundary: first step, waiting, due at once, nothing tried', () => {
    const start = {
      step: 'create',
      state: 'waiting',
      attempts: 0,
      nextAttemptAt: 1_000,
      createdAt: 1_000,
      attention: null,
      lastError: null,
      doneAt: null,
      userId: 'u1',
      label: { fieldName: 'North', ranchName: 'Ranch' },
    };
    const walk = newJob({ body: walkBody(uuid(3)), userId: 'u1', photos: [{ stop: 2, key: 'k2' }], label: { fieldName: 'North', ranchName: 'Ranch' }, now: 1_000 });
    expect(walk).toMatchObject({ ...start, id: uuid(3), photos: [{ stop: 2, key: 'k2', state: 'pending' }] });
    expect(walk.kind).toBeUndefined();
    const body: BoundaryProposalCreate = {
      id: uuid(4),
      boundary: { type: 'Polygon', coordinates: [[[-134.9, 36.2], [-134.898, 36.2], [-134.898, 36.201], [-134.9, 36.2]]] },
      pointsRecorded: 40,
      medianAccuracyM: 5,
    };
    const traced = newBoundaryJob({ fieldId: 'field-9', body, userId: 'u1', label: { fieldName: 'North', ranchName: 'Ranch' }, now: 1_000 });
    expect(traced).toEqual({ ...start, id: uuid(4), kind: 'boundary', fieldId: 'field-9', body, photos: [] });
  });
});

describe('which jobs had to wait (their arrival is said once the signal is back)', () => {
  it('a failed try, a sign-in, or no signal on the phone; never one sent at once or already sent', () => {
    const fresh = job(1, 0);
    const failed = { ...fresh, attempts: 1, lastError: { status: 0, code: 'network', message: 'Failed to fetch' } };
    const signin = { ...fresh, attention: 'signin' as const };
    const sent = { ...fresh, state: 'done' as const, step: 'done' as const, doneAt: 5 };
    expect(hadToWait(fresh, true)).toBe(false); // just queued with signal: it goes at once
    expect(hadToWait(fresh, false)).toBe(true); // queued without signal, even if never tried (behind another)
    expect(hadToWait(failed, true)).toBe(true);
    expect(hadToWait(signin, true)).toBe(true);
    expect(hadToWait(sent, false)).toBe(false);
  });
});

describe('backoff', () => {
  it('doubles its ceiling per failure, from base/2 up to the cap, with jitter in the upper half', () => {
    const { baseMs, maxMs } = DEFAULT_BACKOFF;
    expect(backoffDelay(1, () => 0)).toBe(baseMs / 2);
    expect(backoffDelay(1, () => 1)).toBe(baseMs);
    expect(backoffDelay(2, () => 1)).toBe(2 * baseMs);
    expect(backoffDelay(3, () => 0.5)).toBe(3 * baseMs);
    for (let attempt = 1; attempt <= 60; attempt++) {
      for (const r of [0, 0.37, 0.999999]) {
        const d = backoffDelay(attempt, () => r);
        expect(d).toBeGreaterThanOrEqual(baseMs / 2);
        expect(d).toBeLessThanOrEqual(maxMs);
      }
    }
    expect(backoffDelay(60, () => 1)).toBe(maxMs);
    expect(backoffDelay(60, () => 0)).toBe(maxMs / 2);
  });

  it('schedules the next retry within the bound after each failure', async () => {
    const server = fakeServer();
    const clock = fakeClock();
    const net = fakeNetwork(server, Array(30).fill('down'));
    const storage = fakeStorage();
    const queue = createQueue({ storage, transport: net.transport, ...clock, random: () => 0.5 });
    queue.setUser('u1');
    await queue.enqueue(job(1, clock.now()));
    await queue.run();
    const waits: number[] = [];
    for (let k = 0; k < 12; k++) {
      waits.push(at(clock.pending(), 0, 'pending retry'));
      clock.fireNext();
      await queue.run();
    }
    // 0.75 × ceiling: 1.5 s, 3 s, 6 s, … then held at 0.75 × 5 min.
    expect(waits.slice(0, 4)).toEqual([1500, 3000, 6000, 12000]);
    expect(Math.max(...waits)).toBeLessThanOrEqual(DEFAULT_BACKOFF.maxMs);
    expect(waits.at(-1)).toBe(0.75 * DEFAULT_BACKOFF.maxMs);
    expect(server.walks.size).toBe(0);
  });
});

describe('the offline queue delivers every walk exactly once', () => {
  it('survives a network that fails, then recovers', async () => {
    const server = fakeServer();
    const clock = fakeClock();
    const net = fakeNetwork(server, Array(7).fill('down'));
    const storage = fakeStorage();
    const queue = createQueue({ storage, transport: net.transport, ...clock, random: () => 0.3 });
    queue.setUser('u1');
    for (let n = 1; n <= 5; n++) await queue.enqueue(job(n, clock.now() + n, n % 2 ? [1, 3] : []));
    await queue.run();
    expect(summarise(queue.snapshot()).waiting).toBe(5);

    await settle(queue, clock);

    expect(server.walks.size).toBe(5);
    for (let n = 1; n <= 5; n++) {
      const w = server.walks.get(uuid(n))!;
      expect(JSON.parse(w.json).plants).toHaveLength(10);
      expect(w.submitted).toBe(true);
      expect([...w.photos.keys()]).toEqual(n % 2 ? [1, 3] : []);
    }
    expect(summarise(queue.snapshot())).toEqual({ waiting: 0, attention: 0, signin: 0, done: 5 });
    expect([...storage.rows.values()].every((j) => j.state === 'done')).toBe(true);
  });

  it('a lost answer to create, photo and submit is retried without a second record', async () => {
    const server = fakeServer();
    const clock = fakeClock();
    // create stored but answer lost; photo stored but answer lost; submit done but answer lost.
    const net = fakeNetwork(server, ['lose-answer', 'ok', 'lose-answer', 'ok', 'lose-answer', 'ok']);
    const queue = createQueue({ storage: fakeStorage(), transport: net.transport, ...clock, random: () => 0 });
    queue.setUser('u1');
    await queue.enqueue(job(1, clock.now(), [2]));
    await queue.run();
    await settle(queue, clock);

    expect(server.calls.create).toBe(2);
    expect(server.walks.size).toBe(1);
    expect(server.walks.get(uuid(1))!.photos.get(2)).toBe(2); // re-posted: replaced, still one photo
    expect(server.walks.get(uuid(1))!.submitted).toBe(true);
    expect(queue.get(uuid(1))!.state).toBe('done');
  });

  it('a reload resumes from the saved step', async () => {
    const server = fakeServer();
    const clock = fakeClock();
    const storage = fakeStorage();
    // Create goes through, then the signal drops for the photo.
    const first = createQueue({ storage, transport: fakeNetwork(server, ['ok', 'down']).transport, ...clock });
    first.setUser('u1');
    await first.enqueue(job(1, clock.now(), [4]));
    await first.run();
    first.stop();
    expect(storage.rows.get(uuid(1))!.step).toBe('photos');

    // The tab is closed and opened again: a new queue over the same store.
    const second = createQueue({ storage, transport: fakeNetwork(server).transport, ...clock });
    second.setUser('u1');
    await second.retryNow();
    expect(server.calls.create).toBe(1);
    expect(server.walks.get(uuid(1))!.submitted).toBe(true);
    expect(storage.rows.get(uuid(1))!.state).toBe('done');
  });

  it('"signal is back" sends at once instead of waiting out the backoff', async () => {
    const server = fakeServer();
    const clock = fakeClock();
    const queue = createQueue({
      storage: fakeStorage(),
      transport: fakeNetwork(server, Array(5).fill('down')).transport,
      ...clock,
      random: () => 1,
    });
    queue.setUser('u1');
    await queue.enqueue(job(1, clock.now()));
    await queue.run();
    for (let k = 0; k < 4; k++) {
      clock.fireNext();
      await queue.run();
    }
    expect(clock.pending()[0]).toBeGreaterThan(10_000);
    await queue.retryNow(); // the 'online' event (the fifth call still fails)
    await queue.retryNow();
    expect(server.walks.get(uuid(1))?.submitted).toBe(true);
  });
});

describe('what the queue will not do silently', () => {
  it('keeps a walk that conflicts (409) and marks it for attention; the others still go', async () => {
    const server = fakeServer();
    server.create({ ...walkBody(uuid(1)), notes: 'a different walk under the same id' });
    server.calls.create = 0;
    const clock = fakeClock();
    const storage = fakeStorage();
    const queue = createQueue({ storage, transport: fakeNetwork(server).transport, ...clock });
    queue.setUser('u1');
    await queue.enqueue(job(1, clock.now()));
    await queue.run();
    await queue.enqueue(job(2, clock.now() + 1));
    await queue.run();
    await settle(queue, clock);

    const conflicted = storage.rows.get(uuid(1))!;
    expect(conflicted.state).toBe('attention');
    expect(conflicted.attention).toBe('conflict');
    expect(conflicted.lastError?.status).toBe(409);
    expect((conflicted as WalkJob).body.plants).toHaveLength(10); // the data is all still there
    expect(server.calls.create).toBe(2); // tried once, not hammered
    expect(storage.rows.get(uuid(2))!.state).toBe('done');
    expect(summarise(queue.snapshot())).toMatchObject({ attention: 1, done: 1, waiting: 0 });
    expect(clock.pending()).toEqual([]); // no retry timer for a conflict
  });

  it('waits for the sampler to sign in again after a 401, then sends', async () => {
    const server = fakeServer();
    const clock = fakeClock();
    let signedIn = false;
    const transport: QueueTransport = {
      createWalk: async (b) => {
        if (!signedIn) throw new HttpFail(401, 'unauthenticated');
        return server.create(b);
      },
      uploadPhoto: async (id, p) => server.photo(id, p.stop),
      submitWalk: async (id) => server.submit(id),
      proposeBoundary: async (fieldId, b) => server.propose(fieldId, b),
    };
    const queue = createQueue({ storage: fakeStorage(), transport, ...clock });
    queue.setUser('u1');
    await queue.enqueue(job(1, clock.now()));
    await queue.run();
    expect(queue.get(uuid(1))).toMatchObject({ state: 'waiting', attention: 'signin' });
    expect(summarise(queue.snapshot()).signin).toBe(1);
    expect(clock.pending()).toEqual([]); // retrying cannot help until they sign in
    signedIn = true;
    await queue.retryNow();
    expect(server.walks.get(uuid(1))?.submitted).toBe(true);
  });

  it("never sends another person's walk under this session", async () => {
    const server = fakeServer();
    const clock = fakeClock();
    const queue = createQueue({ storage: fakeStorage(), transport: fakeNetwork(server).transport, ...clock });
    queue.setUser('u2');
    await queue.enqueue(job(1, clock.now(), [], 'u1'));
    await queue.run();
    await queue.retryNow();
    expect(server.walks.size).toBe(0);
    queue.setUser('u1');
    await queue.retryNow();
    expect(server.walks.size).toBe(1);
  });

  it('a photo the server refuses (413) does not hold back the measurements', async () => {
    const server = fakeServer();
    const clock = fakeClock();
    const net = fakeNetwork(server);
    const transport: QueueTransport = {
      ...net.transport,
      uploadPhoto: async (id, p) => {
        if (p.stop === 2) throw new HttpFail(413, 'too_large');
        return server.photo(id, p.stop);
      },
    };
    const queue = createQueue({ storage: fakeStorage(), transport, ...clock });
    queue.setUser('u1');
    await queue.enqueue(job(1, clock.now(), [1, 2, 3]));
    await queue.run();
    const done = queue.get(uuid(1))!;
    expect(done.state).toBe('done');
    expect(done.photos.map((p) => p.state)).toEqual(['sent', 'refused', 'sent']);
    expect(server.walks.get(uuid(1))!.submitted).toBe(true);
  });

  it('classifies errors', () => {
    expect(classify(new TypeError('Failed to fetch'), 'create')).toBe('retry');
    expect(classify(new HttpFail(0, 'network'), 'create')).toBe('retry');
    expect(classify(new HttpFail(503, 'x'), 'submit')).toBe('retry');
    expect(classify(new HttpFail(429, 'rate_limited'), 'create')).toBe('retry');
    expect(classify(new HttpFail(401, 'unauthenticated'), 'create')).toBe('signin');
    expect(classify(new HttpFail(409, 'conflict'), 'create')).toBe('conflict');
    expect(classify(new HttpFail(400, 'invalid'), 'create')).toBe('refused');
    expect(classify(new HttpFail(415, 'unsupported_type'), 'photos')).toBe('skip_photo');
    expect(classify(new HttpFail(404, 'not_found'), 'photos')).toBe('refused');
  });

  it('sends a traced boundary in one step: no signal, then a lost answer, then sent; the office gets one proposal', async () => {
    const server = fakeServer();
    const clock = fakeClock();
    const net = fakeNetwork(server, ['down', 'lose-answer', 'ok']);
    const storage = fakeStorage();
    const queue = createQueue({ storage, transport: net.transport, ...clock, random: () => 0.5 });
    queue.setUser('u1');
    const body: BoundaryProposalCreate = {
      id: uuid(7),
      boundary: { type: 'Polygon', coordinates: [[[-134.9, 36.2], [-134.898, 36.2], [-134.898, 36.201], [-134.9, 36.2]]] },
      pointsRecorded: 120,
      medianAccuracyM: 4,
    };
    await queue.enqueue(newBoundaryJob({ fieldId: 'field-9', body, userId: 'u1', label: { fieldName: 'North', ranchName: 'Ranch' }, now: clock.now() }));
    await settle(queue, clock);
    expect(storage.rows.get(uuid(7))).toMatchObject({ kind: 'boundary', state: 'done', step: 'done' });
    expect(server.calls.propose).toBe(2); // the first try never arrived; the second arrived, its answer was lost; the third answered 200
    expect([...server.proposals.keys()]).toEqual([uuid(7)]);
    expect(server.calls.create + server.calls.submit).toBe(0);
  });

  it('forgets sent walks after two weeks but never an unsent one', async () => {
    const storage = fakeStorage();
    const clock = fakeClock(0);
    const old = { ...job(1, 0), state: 'done' as const, step: 'done' as const, doneAt: 0 };
    const unsent = job(2, 0);
    await storage.put(old);
    await storage.put(unsent);
    const later = fakeClock(15 * 24 * 3600_000);
    const queue = createQueue({ storage, transport: fakeNetwork(fakeServer(), Array(9).fill('down')).transport, ...later });
    await queue.load();
    expect([...storage.rows.keys()]).toEqual([uuid(2)]);
    void clock;
  });
});
