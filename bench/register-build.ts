/**
 * The organisation register at scale: 5,000 fields (50 invented ranches of 100 fields, each with a
 * cereal rye planting and an approved walk) written into the second demo organisation's database
 * rows while the server is stopped, then the office's background build (POST /registers/jobs,
 * CSV + PDF) timed while office users keep reading (p99 of a signed-in read during the build).
 */
import { randomUUID } from 'node:crypto';
import Database from 'better-sqlite3';
import autocannon from 'autocannon';
import { DEMO_RULE } from '../shared/calc/rules';
import { DEMO_ORGANISATIONS, DEMO_USERS } from '../seeds/demo-people';
import type { Session } from './http';

export const REGISTER_FIELDS = 5000;
export const REGISTER_YEAR = 2024; // season 2023-24: no demo planting in it
const ORG = DEMO_ORGANISATIONS[1].id;
export const REGISTER_CLERK = 'clerk@quillwater.test';
const user = (email: string) => DEMO_USERS.find((u) => u.email === email)!.id;

/** Writes the 5,000 fields straight into the SQLite file (the server must be stopped). */
export function addLargeRegister(databaseFile: string) {
  const db = new Database(databaseFile);
  const now = new Date().toISOString();
  const sampler = user('sampler@quillwater.test');
  const clerk = user(REGISTER_CLERK);
  const ranch = db.prepare('INSERT INTO ranches (id, organisation_id, name, created_at, updated_at) VALUES (?, ?, ?, ?, ?)');
  const field = db.prepare('INSERT INTO fields (id, organisation_id, ranch_id, name, area_ha, created_at, updated_at) VALUES (?, ?, ?, ?, ?, ?, ?)');
  const planting = db.prepare(
    'INSERT INTO plantings (id, organisation_id, field_id, season, crop, seeded_on, terminated_on, created_at, updated_at) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?)',
  );
  const walk = db.prepare(
    `INSERT INTO field_walks (id, organisation_id, planting_id, sampler_id, walked_on, status, content_hash, estimate, created_at, submitted_at, reviewed_by, reviewed_at)
     VALUES (?, ?, ?, ?, ?, 'approved', 'bench', ?, ?, ?, ?, ?)`,
  );
  db.transaction(() => {
    for (let r = 0; r < REGISTER_FIELDS / 100; r++) {
      const ranchId = randomUUID();
      ranch.run(ranchId, ORG, `Bench Ranch ${String(r + 1).padStart(2, '0')}`, now, now);
      for (let f = 0; f < 100; f++) {
        const fieldId = randomUUID();
        const plantingId = randomUUID();
        const i = r * 100 + f;
        field.run(fieldId, ORG, ranchId, `Block ${String(f + 1).padStart(3, '0')}`, 2 + (i % 37) * 0.5, now, now);
        planting.run(plantingId, ORG, fieldId, '2023-24', 'cereal_rye', '2023-10-10', '2024-03-25', now, now);
        const biomass = 3500 + ((i * 97) % 4000); // some above the threshold, some below
        const estimate = {
          calibrationId: 'bench-calibration',
          calibrationVersion: 1,
          n: 10,
          meanLengthCm: 60 + (i % 30),
          biomassKgHa: biomass,
          interval: [biomass * 0.85, biomass * 1.15],
          samplingRange: [biomass * 0.92, biomass * 1.08],
          level: 0.9,
          thresholdKgHa: DEMO_RULE.thresholdKgHa,
          meetsThreshold: biomass >= DEMO_RULE.thresholdKgHa,
          extrapolated: false,
          morePlantsSuggested: null,
          note: 'bench estimate',
        };
        walk.run(randomUUID(), ORG, plantingId, sampler, '2024-03-01', JSON.stringify(estimate), now, now, clerk, now);
      }
    }
  })();
  db.close();
}

export interface RegisterBuildResult {
  ms: number;
  phase: string;
  rows: number | null;
  /** Distinct progress values the status showed while building. */
  progressSteps: number;
  readP99: number;
  readRps: number;
}

/**
 * Starts the organisation register build and polls its status until done; meanwhile 5 office
 * users (connections) keep reading `readPath` signed in as `reader`.
 */
export async function timeRegisterBuild(url: string, builder: Session, reader: Session, readPath: string): Promise<RegisterBuildResult> {
  const headers = { cookie: builder.cookie, 'x-csrf-token': builder.csrfToken, accept: 'application/json' };
  let stopReads = () => {};
  const reads = new Promise<{ p99: number; rps: number }>((resolve, reject) => {
    const instance = autocannon(
      { url: `${url}${readPath}`, connections: 5, duration: 60, headers: { cookie: reader.cookie, 'accept-encoding': 'gzip, deflate, br' } },
      (err: Error | null, r: { latency: { p99: number }; requests: { average: number } }) => (err ? reject(err) : resolve({ p99: r.latency.p99, rps: r.requests.average })),
    );
    stopReads = () => instance.stop();
  });
  await new Promise((r) => setTimeout(r, 1000)); // readers first, as in an office already at work

  const t0 = performance.now();
  const started = await fetch(`${url}/registers/jobs`, {
    method: 'POST',
    headers: { ...headers, 'content-type': 'application/x-www-form-urlencoded' },
    body: `year=${REGISTER_YEAR}`,
  });
  if (started.status !== 202) {
    stopReads();
    await reads.catch(() => {});
    throw new Error(`POST /registers/jobs answered ${started.status}: ${(await started.text()).slice(0, 300)}`);
  }
  const { statusUrl } = (await started.json()) as { statusUrl: string };
  const progress = new Set<string>();
  let status: { phase: string; percent?: number; fieldsComputed?: number; fieldsWritten?: number; result?: { rows?: number } } = { phase: 'queued' };
  while (status.phase !== 'done' && status.phase !== 'failed' && performance.now() - t0 < 60_000) {
    await new Promise((r) => setTimeout(r, 100));
    status = (await (await fetch(`${url}${statusUrl}`, { headers })).json()) as typeof status;
    progress.add(`${status.phase}:${status.percent ?? ''}:${status.fieldsComputed ?? ''}:${status.fieldsWritten ?? ''}`);
  }
  const ms = performance.now() - t0;
  stopReads();
  const read = await reads;
  return { ms, phase: status.phase, rows: status.result?.rows ?? null, progressSteps: progress.size, readP99: read.p99, readRps: read.rps };
}
