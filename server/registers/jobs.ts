import type { Knex } from 'knex';
import type { Logger } from 'pino';
import { HttpError } from '../platform/errors';
import type { JobContext, JobQueue, JobRow } from '../platform/jobs';
import type { Units } from '../people/public';
import { approvedWalksFor, countFields, registerRanches } from './inputs-db';
import { getRegister, latestRegistersOfYear } from './db';
import { creditRuleForYear } from '../rules/public';
import { asDraft, asFinal, registerUnits, type RegisterDoc } from './format';
import { registerCsvInSteps } from './csv';
import { registerPdf } from './pdf';
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
 * The organisation's register for a year (every ranch, one after the other) built as a background
 * job (server/platform/jobs.ts): any app server may build it, and its progress, CSV and PDF are
 * kept in the database, so the server that is polled need not be the one that builds. Rows are
 * computed in chunks with setImmediate between them so the building server keeps answering. Each
 * ranch contributes its newest finalised version when one exists, else its draft computed now.
 * Progress counts every field twice: once computed, once written into the PDF. Results are kept
 * for an hour.
 */

export const REGISTER_BUILD = 'register-build';

export type JobPhase = 'queued' | 'computing' | 'writing' | 'done' | 'failed';

interface BuildPayload {
  organisationId: string;
  year: number;
  units: Units;
}

interface BuildProgress {
  phase: 'computing' | 'writing';
  fieldsTotal: number;
  fieldsComputed: number;
  fieldsWritten: number;
}

interface BuildResult {
  ranches: number;
  rows: number;
  creditKgN: number;
  stem: string;
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
  jobs: JobQueue;
  logger: Logger;
  /** Fields computed between two yields to the event loop. */
  chunk?: number;
  /** Most builds of one organisation queued or running at once. */
  maxJobs?: number;
  ttlMs?: number;
  now?: () => number;
  /** Where status URLs point (the office router's mount). */
  basePath?: string;
}

const yieldToLoop = () => new Promise<void>((resolve) => setImmediate(resolve));
const FILES = { csv: 'text/csv; charset=utf-8', pdf: 'application/pdf' } as const;

export function createRegisterJobs(opts: RegisterJobsOptions) {
  const chunk = opts.chunk ?? 250;
  const maxJobs = opts.maxJobs ?? 10;
  const now = opts.now ?? Date.now;
  const base = opts.basePath ?? '/registers/jobs';

  async function build(job: JobContext<BuildPayload, BuildProgress>): Promise<BuildResult> {
    const { db } = opts;
    const { organisationId: orgId, year, units } = job.payload;
    const started = now();
    const p: BuildProgress = { phase: 'computing', fieldsTotal: await countFields(db, orgId), fieldsComputed: 0, fieldsWritten: 0 };
    // Progress is written at most every 200 ms: every server reads it, none waits on it.
    let saved = 0;
    const report = async (force = false) => {
      if (!force && now() - saved < 200) return;
      saved = now();
      await job.progress({ ...p });
    };
    await report(true);
    const today = new Date(now()).toISOString().slice(0, 10);
    const season = seasonOfYear(year);
    const rule = ruleOfRegister(await creditRuleForYear(db, orgId, year));
    const ranches = await registerRanches(db, orgId);
    const finals = await latestRegistersOfYear(db, orgId, year);
    const projectionDate = projectionDateOf(year, today);
    // Drafts read the registry as it stood at each ranch's cut-off (registry-as-of.ts).
    const drafts = ranches.filter((r) => !finals.has(r.id));
    const inputs = new Map((await registerInputs(db, orgId, year, drafts, {}, drafts.length === ranches.length)).map((i) => [i.ranch.id, i]));
    const docs: RegisterDoc[] = [];
    for (const ranch of ranches) {
      const fin = finals.get(ranch.id);
      const stored = fin && (await getRegister(db, orgId, fin.id));
      if (stored) {
        const doc = asFinal(parseStored(stored));
        docs.push(doc);
        p.fieldsComputed += doc.rows.length;
        continue;
      }
      const { ranch: asOfRanch, fields } = inputs.get(ranch.id)!;
      const walks = walksByPlanting(await approvedWalksFor(db, orgId, fields.flatMap((f) => (f.plantingId ? [f.plantingId] : []))));
      const rows: RegisterRow[] = [];
      for (let i = 0; i < fields.length; i += chunk) {
        for (const f of fields.slice(i, i + chunk)) {
          rows.push(registerRow(f, (f.plantingId && walks.get(f.plantingId)) || [], rule, projectionDate, season));
          p.fieldsComputed += 1;
        }
        await report();
        await yieldToLoop();
      }
      docs.push(asDraft(assembleRegister(orgId, asOfRanch, year, rule, today, rows)));
    }
    p.fieldsTotal = Math.max(p.fieldsTotal, p.fieldsComputed);

    const computedAt = now();
    p.phase = 'writing';
    await report(true);
    const csv = await registerCsvInSteps(docs, units, yieldToLoop);
    const csvAt = now();
    const totals = summarise(docs.flatMap((d) => d.rows));
    const u = registerUnits(units);
    const finalCount = docs.filter((d) => d.status === 'final').length;
    const pending: Promise<void>[] = [];
    const pdf = await registerPdf(docs, {
      units,
      onRow: () => {
        p.fieldsWritten += 1;
        pending.push(report());
      },
      cover: {
        title: `Credit registers ${year}`,
        lines: [
          `Reporting year ${year}: plantings of the ${season.replace('-', '–')} season, under the credit rule in effect on 1 January ${year} (${rule.label}).`,
          `${docs.length} ranches, ${totals.fields} fields: ${finalCount} ranch register(s) finalised (their newest version), ${docs.length - finalCount} draft(s) computed on ${today}.`,
          `Eligible: ${totals.eligibleFields} fields, ${u.area(totals.eligibleAreaHa)}; credit total ${u.massN(totals.creditKgN)} (${u.num(totals.creditKgN, 1)} kg N).`,
          ...docs.map(
            (d) =>
              `${d.ranch.name}: ${d.status === 'final' ? `version ${d.version}, sha256 ${d.contentHash}` : 'draft'}; ${d.totals.eligibleFields} of ${d.totals.fields} fields eligible; ${u.massN(d.totals.creditKgN)}.`,
          ),
        ],
      },
    });
    await Promise.all(pending);
    const pdfAt = now();
    await report(true);
    await job.output('csv', FILES.csv, Buffer.from(csv, 'utf8'));
    await job.output('pdf', FILES.pdf, pdf);
    // Where the time went, for whoever tunes the build (README, "Speed").
    const steps = { computeMs: computedAt - started, csvMs: csvAt - computedAt, pdfMs: pdfAt - csvAt, storeMs: now() - pdfAt };
    opts.logger.info({ job: job.id, fields: totals.fields, ms: now() - started, ...steps }, 'organisation register built');
    return { ranches: docs.length, rows: totals.fields, creditKgN: totals.creditKgN, stem: `crowntip-registers-${year}` };
  }

  opts.jobs.define(REGISTER_BUILD, build, { retries: 1, retryDelaySeconds: 5, timeoutSeconds: 30 * 60, keepFinishedMs: opts.ttlMs ?? 3_600_000 });

  function status(job: JobRow<BuildPayload, BuildProgress, BuildResult>): JobStatus {
    const p = job.progress ?? { phase: 'computing', fieldsTotal: 0, fieldsComputed: 0, fieldsWritten: 0 };
    const phase: JobPhase = job.state === 'done' ? 'done' : job.state === 'failed' ? 'failed' : job.state === 'queued' || !job.progress ? 'queued' : p.phase;
    const steps = 2 * p.fieldsTotal;
    const done = p.fieldsComputed + p.fieldsWritten;
    const percent = phase === 'done' ? 100 : steps ? Math.min(99, Math.floor((100 * done) / steps)) : 0;
    const startedAt = job.startedAt ? Date.parse(job.startedAt) : null;
    const result = job.state === 'done' ? job.result : null;
    return {
      id: job.id,
      year: job.payload.year,
      phase,
      percent,
      fieldsTotal: p.fieldsTotal,
      fieldsComputed: p.fieldsComputed,
      fieldsWritten: p.fieldsWritten,
      error: phase === 'failed' ? 'The register could not be built. The error was logged; try again.' : null,
      elapsedMs: startedAt === null ? null : (job.finishedAt ? Date.parse(job.finishedAt) : now()) - startedAt,
      result: result ? { ranches: result.ranches, rows: result.rows, creditKgN: result.creditKgN, csvUrl: `${base}/${job.id}.csv`, pdfUrl: `${base}/${job.id}.pdf` } : null,
    };
  }

  return {
    /** Queues a build of the organisation's register for the year; answers at once. */
    async start(organisationId: string, year: number, user: { id: string; units: Units }): Promise<JobStatus> {
      const active = await opts.jobs.active(organisationId);
      if ((active[REGISTER_BUILD] ?? 0) >= maxJobs) {
        throw new HttpError('rate_limited', 'Several registers are being built already. Try again in a few minutes.');
      }
      const payload: BuildPayload = { organisationId, year, units: user.units };
      const { id } = await opts.jobs.enqueue(REGISTER_BUILD, payload, { organisationId, createdBy: user.id });
      const job = await opts.jobs.get<BuildPayload, BuildProgress, BuildResult>(id, organisationId);
      return status(job!);
    },

    /** The organisation's build, or undefined (unknown, expired, or another organisation's). */
    async status(organisationId: string, id: string): Promise<JobStatus | undefined> {
      const job = await opts.jobs.get<BuildPayload, BuildProgress, BuildResult>(id, organisationId);
      return job && job.kind === REGISTER_BUILD ? status(job) : undefined;
    },

    /** A finished build's file with its download name, or undefined. */
    async file(organisationId: string, id: string, kind: keyof typeof FILES) {
      const job = await opts.jobs.get<BuildPayload, BuildProgress, BuildResult>(id, organisationId);
      if (!job || job.kind !== REGISTER_BUILD) return undefined;
      const file = job.state === 'done' && job.result ? await opts.jobs.output(id, organisationId, kind) : undefined;
      return { ready: Boolean(file), name: `${job.result?.stem ?? 'crowntip-registers'}.${kind}`, ...file };
    },
  };
}

export type RegisterJobs = ReturnType<typeof createRegisterJobs>;
