import { randomUUID } from 'node:crypto';
import type { Knex } from 'knex';
import type { Logger } from 'pino';
import { HttpError } from '../platform/errors';
import type { Units } from '../people/public';
import { approvedWalksFor, countFields, registerRanches } from './inputs-db';
import { getRegister, latestRegistersOfYear } from './db';
import { creditRuleForYear } from '../rules/public';
import { asDraft, asFinal, registerUnits, type RegisterDoc } from './format';
import { registerCsv, registerPdf } from './output';
import {
  assembleRegister,
  parseStored,
  projectionDateOf,
  registerInputs,
  registerRow,
  ruleOfRegister,
  seasonOfYear,
  summarise,
  walksByPlanting,
  type RegisterRow,
} from './service';

/*
 * The organisation's register for a year (every ranch, one after the other) built in the
 * background: an in-process queue runs one job at a time, computing rows in chunks with
 * setImmediate between them so the server keeps answering. Each ranch contributes its newest
 * finalised version when one exists, else its draft computed now. Progress counts every field
 * twice: once computed, once written into the PDF. Results stay in this process's memory (at most
 * MAX_JOBS, each for an hour); several app servers would each keep their own (README).
 */

export type JobPhase = 'queued' | 'computing' | 'writing' | 'done' | 'failed';

export interface RegisterJob {
  id: string;
  organisationId: string;
  year: number;
  units: Units;
  createdBy: string;
  createdAt: number;
  phase: JobPhase;
  fieldsTotal: number;
  fieldsComputed: number;
  fieldsWritten: number;
  startedAt: number | null;
  finishedAt: number | null;
  error: string | null;
  result: { csv: string; pdf: Buffer; ranches: number; rows: number; creditKgN: number; stem: string } | null;
}

export interface JobStatus {
  id: string;
  year: number;
  phase: JobPhase;
  percent: number;
  fieldsTotal: number;
  fieldsComputed: number;
  fieldsWritten: number;
  error: string | null;
  elapsedMs: number | null;
  result: { ranches: number; rows: number; creditKgN: number; csvUrl: string; pdfUrl: string } | null;
}

export interface RegisterJobsOptions {
  db: Knex;
  logger: Logger;
  /** Fields computed between two yields to the event loop. */
  chunk?: number;
  maxJobs?: number;
  ttlMs?: number;
  now?: () => number;
  /** Where status URLs point (the office router's mount). */
  basePath?: string;
}

const yieldToLoop = () => new Promise<void>((resolve) => setImmediate(resolve));

export function createRegisterJobs(opts: RegisterJobsOptions) {
  const chunk = opts.chunk ?? 250;
  const maxJobs = opts.maxJobs ?? 10;
  const ttlMs = opts.ttlMs ?? 3_600_000;
  const now = opts.now ?? Date.now;
  const base = opts.basePath ?? '/registers/jobs';
  const jobs = new Map<string, RegisterJob>();
  let queue: Promise<void> = Promise.resolve();

  const expired = (j: RegisterJob) => j.finishedAt !== null && now() - j.finishedAt > ttlMs;

  function prune() {
    for (const [id, j] of jobs) if (expired(j)) jobs.delete(id);
    // Over the bound: forget the oldest finished jobs first.
    const finished = [...jobs.values()].filter((j) => j.finishedAt !== null).sort((a, b) => a.finishedAt! - b.finishedAt!);
    while (jobs.size >= maxJobs && finished.length) jobs.delete(finished.shift()!.id);
  }

  async function run(job: RegisterJob) {
    const { db } = opts;
    const orgId = job.organisationId;
    job.startedAt = now();
    job.phase = 'computing';
    job.fieldsTotal = await countFields(db, orgId);
    const today = new Date(now()).toISOString().slice(0, 10);
    const season = seasonOfYear(job.year);
    const rule = ruleOfRegister(await creditRuleForYear(db, orgId, job.year));
    const ranches = await registerRanches(db, orgId);
    const finals = await latestRegistersOfYear(db, orgId, job.year);
    const projectionDate = projectionDateOf(job.year, today);
    // Drafts read the registry as it stood at each ranch's cut-off (registry-as-of.ts).
    const drafts = ranches.filter((r) => !finals.has(r.id));
    const inputs = new Map((await registerInputs(db, orgId, job.year, drafts, {}, drafts.length === ranches.length)).map((i) => [i.ranch.id, i]));
    const docs: RegisterDoc[] = [];
    for (const ranch of ranches) {
      const fin = finals.get(ranch.id);
      const stored = fin && (await getRegister(db, orgId, fin.id));
      if (stored) {
        const doc = asFinal(parseStored(stored));
        docs.push(doc);
        job.fieldsComputed += doc.rows.length;
        continue;
      }
      const { ranch: asOfRanch, fields } = inputs.get(ranch.id)!;
      const walks = walksByPlanting(await approvedWalksFor(db, orgId, fields.flatMap((f) => (f.plantingId ? [f.plantingId] : []))));
      const rows: RegisterRow[] = [];
      for (let i = 0; i < fields.length; i += chunk) {
        for (const f of fields.slice(i, i + chunk)) {
          rows.push(registerRow(f, (f.plantingId && walks.get(f.plantingId)) || [], rule, projectionDate, season));
          job.fieldsComputed += 1;
        }
        await yieldToLoop();
      }
      docs.push(asDraft(assembleRegister(orgId, asOfRanch, job.year, rule, today, rows)));
    }
    job.fieldsTotal = Math.max(job.fieldsTotal, job.fieldsComputed);

    job.phase = 'writing';
    const csv = registerCsv(docs, job.units);
    const totals = summarise(docs.flatMap((d) => d.rows));
    const u = registerUnits(job.units);
    const finalCount = docs.filter((d) => d.status === 'final').length;
    const pdf = await registerPdf(docs, {
      units: job.units,
      onRow: () => {
        job.fieldsWritten += 1;
      },
      cover: {
        title: `Credit registers ${job.year}`,
        lines: [
          `Reporting year ${job.year}: plantings of the ${season.replace('-', '–')} season, under the credit rule in effect on 1 January ${job.year} (${rule.label}).`,
          `${docs.length} ranches, ${totals.fields} fields: ${finalCount} ranch register(s) finalised (their newest version), ${docs.length - finalCount} draft(s) computed on ${today}.`,
          `Eligible: ${totals.eligibleFields} fields, ${u.area(totals.eligibleAreaHa)}; credit total ${u.massN(totals.creditKgN)} (${u.num(totals.creditKgN, 1)} kg N).`,
          ...docs.map(
            (d) =>
              `${d.ranch.name}: ${d.status === 'final' ? `version ${d.version}, sha256 ${d.contentHash}` : 'draft'}; ${d.totals.eligibleFields} of ${d.totals.fields} fields eligible; ${u.massN(d.totals.creditKgN)}.`,
          ),
        ],
      },
    });
    job.result = { csv, pdf, ranches: docs.length, rows: totals.fields, creditKgN: totals.creditKgN, stem: `crowntip-registers-${job.year}` };
    job.phase = 'done';
    job.finishedAt = now();
    opts.logger.info({ job: job.id, fields: totals.fields, ms: job.finishedAt - job.startedAt }, 'organisation register built');
  }

  return {
    /** Queues a build of the organisation's register for the year; answers at once. */
    start(organisationId: string, year: number, user: { id: string; units: Units }): RegisterJob {
      prune();
      if ([...jobs.values()].filter((j) => j.finishedAt === null).length >= maxJobs) {
        throw new HttpError('rate_limited', 'Several registers are being built already. Try again in a few minutes.');
      }
      const job: RegisterJob = {
        id: randomUUID(),
        organisationId,
        year,
        units: user.units,
        createdBy: user.id,
        createdAt: now(),
        phase: 'queued',
        fieldsTotal: 0,
        fieldsComputed: 0,
        fieldsWritten: 0,
        startedAt: null,
        finishedAt: null,
        error: null,
        result: null,
      };
      jobs.set(job.id, job);
      queue = queue.then(async () => {
        await yieldToLoop(); // answer the request that queued the job first
        try {
          await run(job);
        } catch (err) {
          opts.logger.error({ err, job: job.id }, 'organisation register failed');
          job.phase = 'failed';
          job.error = 'The register could not be built. The error was logged; try again.';
          job.finishedAt = now();
        }
      });
      return job;
    },

    /** The organisation's job, or undefined (unknown, expired, or another organisation's). */
    get(organisationId: string, id: string): RegisterJob | undefined {
      const job = jobs.get(id);
      if (!job || job.organisationId !== organisationId || expired(job)) return undefined;
      return job;
    },

    status(job: RegisterJob): JobStatus {
      const steps = 2 * job.fieldsTotal;
      const done = job.fieldsComputed + job.fieldsWritten;
      const percent = job.phase === 'done' ? 100 : steps ? Math.min(99, Math.floor((100 * done) / steps)) : 0;
      return {
        id: job.id,
        year: job.year,
        phase: job.phase,
        percent,
        fieldsTotal: job.fieldsTotal,
        fieldsComputed: job.fieldsComputed,
        fieldsWritten: job.fieldsWritten,
        error: job.error,
        elapsedMs: job.startedAt === null ? null : (job.finishedAt ?? now()) - job.startedAt,
        result: job.result
          ? { ranches: job.result.ranches, rows: job.result.rows, creditKgN: job.result.creditKgN, csvUrl: `${base}/${job.id}.csv`, pdfUrl: `${base}/${job.id}.pdf` }
          : null,
      };
    },

    /** Resolves when every queued job has finished (tests, shutdown). */
    idle: () => queue,
  };
}

export type RegisterJobs = ReturnType<typeof createRegisterJobs>;
