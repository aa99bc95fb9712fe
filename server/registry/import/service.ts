import path from 'node:path';
import type { Knex } from 'knex';
import * as plantingsDb from '../plantings-db';
import { HttpError } from '../../platform/errors';
import { Mapping, autoMapping, mappingFromParams } from './columns';
import { ParsedCsv, parseCsv } from './read';
import { CropOption } from './values';
import { CheckResult, checkRows, loadSnapshot } from './check';
import { ImportActor, ImportProgress, ImportResult, commitImport } from './write';
import { ImportJob, ImportMeta, ImportStore } from './store';
import type { ObjectStore } from '../../platform/object-store';
import type { JobQueue, JobRow } from '../../platform/jobs';

/**
 * The registry CSV import: read an uploaded file (read.ts), map its columns to Crowntip's
 * (columns.ts), check every row against the registry (values.ts, check.ts: pure, on a snapshot of
 * the registry), and write all rows in one transaction or none (write.ts). Uploads are kept
 * between preview and commit (store.ts), and the commit runs as a background job that any server
 * may work and every server can report (server/platform/jobs.ts); template.ts
 * makes the template and example files. This file is the import as the routes use it.
 */
export * from './columns';
export * from './read';
export * from './values';
export * from './check';
export * from './write';
export * from './store';
export * from './template';

// 9. The import as the routes use it ---------------------------------------------------------

export interface ImportPreview {
  meta: ImportMeta;
  parsed: ParsedCsv;
  mapping: Mapping;
  check: CheckResult;
  crops: CropOption[];
}

export type CommitStart = { kind: 'imported'; meta: ImportMeta } | { kind: 'job'; job: ImportJob };

export const REGISTRY_IMPORT = 'registry-import';

interface CommitPayload {
  importId: string;
  actor: ImportActor;
  mapping: Mapping;
  total: number;
}
type CommitOutcome = { outcome: 'imported'; result: ImportResult } | { outcome: 'failed'; problemCount: number };

/** The job as the pages show it: a queued commit counts as checking from row 0. */
function importJobOf(job: JobRow<CommitPayload, ImportProgress, CommitOutcome>): ImportJob {
  const { mapping, total } = job.payload;
  const base = { id: job.id, mapping, done: job.progress?.done ?? 0, total: job.progress?.total ?? total };
  if (job.state === 'failed') return { ...base, phase: 'error', message: job.error ?? undefined };
  if (job.state !== 'done') return { ...base, phase: job.progress?.phase ?? 'checking' };
  const r = job.result!;
  return r.outcome === 'imported' ? { ...base, phase: 'imported', done: total, result: r.result } : { ...base, phase: 'failed', problemCount: r.problemCount };
}

export function createRegistryImports(db: Knex, files: ObjectStore, jobs: JobQueue) {
  const store = new ImportStore(files);
  let lastSweep = 0;

  async function load(organisationId: string, id: string): Promise<ImportMeta> {
    const meta = await store.get(organisationId, id);
    if (!meta) throw new HttpError('not_found', 'This import was not found. Upload the file again.');
    return meta;
  }

  async function readParsed(meta: ImportMeta): Promise<ParsedCsv> {
    return parseCsv(await store.read(meta));
  }

  // The commit, on whichever server the queue hands it to (the upload is in the shared file store).
  jobs.define<CommitPayload, ImportProgress, CommitOutcome>(
    REGISTRY_IMPORT,
    async (job) => {
      const { importId, actor, mapping } = job.payload;
      const meta = await load(actor.organisationId, importId);
      // A retry after the rows were written (the server stopped before recording it) only reports.
      if (meta.status === 'imported' && meta.result) return { outcome: 'imported', result: meta.result };
      const parsed = await readParsed(meta);
      await store.update({ ...meta, status: 'importing', mapping });
      const crops = await plantingsDb.listCrops(db);
      let saved = Promise.resolve();
      const outcome = await commitImport(db, actor, { fileName: meta.fileName, parsed, mapping, crops }, (p) => {
        saved = saved.then(() => job.progress(p)).catch(() => undefined);
      });
      await saved;
      if (outcome.ok) {
        // Should this write fail, a second commit still cannot duplicate anything: every row
        // would then find its planting already in the registry and the import would stop.
        await store.update({ ...meta, status: 'imported', mapping, result: outcome.result });
        return { outcome: 'imported', result: outcome.result };
      }
      await store.update({ ...meta, status: 'uploaded', mapping });
      return { outcome: 'failed', problemCount: outcome.check.problems.length + outcome.check.fileProblems.length };
    },
    { retries: 1, retryDelaySeconds: 5, timeoutSeconds: 15 * 60, keepFinishedMs: 86_400_000 },
  );

  /** The upload's newest commit, from any server. */
  async function latestJob(organisationId: string, id: string): Promise<ImportJob | undefined> {
    const job = await jobs.latest<CommitPayload, ImportProgress, CommitOutcome>(REGISTRY_IMPORT, id, organisationId);
    return job && importJobOf(job);
  }

  return {
    store,
    load,
    latestJob,

    async isRunning(organisationId: string, id: string): Promise<boolean> {
      const job = await latestJob(organisationId, id);
      return job?.phase === 'checking' || job?.phase === 'writing';
    },

    /** Waits (at most `timeoutMs`) for the commit to end; the page without script answers then. */
    async waitFor(organisationId: string, job: ImportJob, timeoutMs = 10 * 60_000): Promise<ImportJob> {
      const row = await jobs.waitFor<CommitPayload, ImportProgress, CommitOutcome>(job.id, organisationId, timeoutMs);
      return row ? importJobOf(row) : job;
    },

    /** Reads the file once (so that an unreadable one is refused at once) and keeps it. */
    async upload(actor: ImportActor, fileName: string, buffer: Buffer): Promise<{ meta: ImportMeta; parsed: ParsedCsv }> {
      const parsed = parseCsv(buffer);
      if (Date.now() - lastSweep > 86_400_000) {
        lastSweep = Date.now();
        await store.sweep();
      }
      const meta = await store.save(buffer, { organisationId: actor.organisationId, userId: actor.id, userName: actor.name, fileName: path.basename(fileName || 'upload.csv') });
      return { meta, parsed };
    },

    async preview(meta: ImportMeta, params: Record<string, unknown>, units: 'us' | 'metric'): Promise<ImportPreview> {
      const parsed = await readParsed(meta);
      const mapping = mappingFromParams(params, parsed.headers.length, autoMapping(parsed.headers, units));
      const crops = await plantingsDb.listCrops(db);
      const check = checkRows(parsed, { mapping, snapshot: await loadSnapshot(db, meta.organisationId), crops });
      return { meta, parsed, mapping, check, crops };
    },

    /**
     * Starts the commit, or answers with what is already there: an import that is done stays done
     * (the sidecar says so), and one queued or running is not started twice, from any server (the
     * job's key is the upload's while it is active).
     */
    async commit(meta: ImportMeta, params: Record<string, unknown>, actor: ImportActor, units: 'us' | 'metric'): Promise<CommitStart> {
      if (meta.status === 'imported') return { kind: 'imported', meta };
      const current = await latestJob(meta.organisationId, meta.id);
      if (current && current.phase !== 'failed' && current.phase !== 'error') return { kind: 'job', job: current };
      const parsed = await readParsed(meta);
      const mapping = mappingFromParams(params, parsed.headers.length, autoMapping(parsed.headers, units));
      const payload: CommitPayload = { importId: meta.id, actor: { id: actor.id, name: actor.name, organisationId: actor.organisationId }, mapping, total: parsed.rows.length };
      const { id } = await jobs.enqueue(REGISTRY_IMPORT, payload, { organisationId: meta.organisationId, createdBy: actor.id, subject: meta.id, key: `${REGISTRY_IMPORT}:${meta.id}` });
      const job = await jobs.get<CommitPayload, ImportProgress, CommitOutcome>(id, meta.organisationId);
      return { kind: 'job', job: importJobOf(job!) };
    },
  };
}

export type RegistryImports = ReturnType<typeof createRegistryImports>;
