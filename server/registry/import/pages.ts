import { Router, type NextFunction, type Request, type RequestHandler, type Response } from 'express';
import multer from 'multer';
import { z } from 'zod';
import type { AppContext } from '../../platform/app-context';
import { contextOf } from '../../platform/context';
import { can } from '../../platform/permissions';
import { HttpError } from '../../platform/errors';
import { parseForm } from '../../platform/validation';
import { toCsv } from '../../platform/csv-safe';
import { formatUpTo } from '../../../shared/format/figures';
import {
  AREA_UNITS,
  COLUMN_BY_KEY,
  EXAMPLE_HEADER,
  EXAMPLE_ROWS,
  IMPORT_COLUMNS,
  ImportFileError,
  MAX_ROWS,
  MAX_UPLOAD_BYTES,
  RATE_UNITS,
  canImport,
  createRegistryImports,
  isImportId,
  jobPercent,
  mappingToParams,
  templateHeader,
  templateRows,
  type ImportActor,
  type ImportJob,
  type ImportMeta,
  type ImportPreview,
} from './service';

/**
 * The registry CSV import (clerk and admin): upload → preview with mapping and every problem →
 * commit of all rows in one transaction, or none.
 *
 * CSRF and the upload: lusca runs for every POST before this router, and it reads the token from
 * req.body._csrf or the X-CSRF-Token header. A multipart body is not parsed yet at that point, so
 * the upload form is sent by a small script (client/office.ts) with XMLHttpRequest and the token
 * in X-CSRF-Token; the same request gives the upload progress bar. Every other form here is a
 * plain urlencoded POST with the hidden _csrf field and works without JavaScript.
 */
const BASE = '/registry/import';
/** Where the result page sends the clerk next (server/registry/pages.ts and season-pages.ts). */
const RANCH_LIST_URL = '/registry/ranches';
const seasonUrl = (season: string) => `/registry/season?season=${encodeURIComponent(season)}`;
const PREVIEW_ROWS = 50;
const PAGE_PROBLEMS = 1000;
const PAGE_WARNINGS = 200;

const commitForm = z.object({ id: z.string().refine(isImportId, 'This import was not found. Upload the file again.') });

const wantsJson = (req: Request) => req.accepts(['html', 'json']) === 'json';
const unitsOf = (req: Request) => contextOf(req).units;
const idParam = (req: Request) => String(req.params.id);
const previewUrl = (id: string, params?: Record<string, string>, extra: Record<string, string> = {}) => {
  const q = new URLSearchParams({ ...(params ?? {}), ...extra }).toString();
  return `${BASE}/${id}${q ? `?${q}` : ''}`;
};
const resultUrl = (id: string) => `${BASE}/${id}/result`;

export function registryImportPages(ctx: AppContext): Router {
  const imports = createRegistryImports(ctx.db, ctx.files, ctx.jobs);
  const router = Router();
  router.use(can('registry.write'));

  router.get('/', uploadPage);
  router.get('/template.csv', templateCsv);
  router.get('/example.csv', exampleCsv);
  router.post('/preview', receiveUpload, storeUpload);
  router.post('/commit', commit);
  router.get('/:id', previewPage);
  router.get('/:id/status', status);
  router.get('/:id/result', resultPage);
  router.get('/:id/errors.csv', errorsCsv);
  return router;

  // Handlers ------------------------------------------------------------------------------------

  function renderUpload(res: Response, status = 200, error?: string) {
    res.status(status).render('registry/import', {
      title: 'Import the registry from a CSV file',
      columns: IMPORT_COLUMNS,
      maxBytes: MAX_UPLOAD_BYTES,
      maxRows: MAX_ROWS,
      error: error ?? null,
    });
  }

  function uploadPage(_req: Request, res: Response) {
    renderUpload(res);
  }

  function uploadFailed(req: Request, res: Response, err: HttpError) {
    if (wantsJson(req)) res.status(err.status).json({ error: { code: err.code, message: err.message } });
    else renderUpload(res, err.status, err.message);
  }

  function templateCsv(req: Request, res: Response) {
    res.attachment('crowntip-registry-template.csv');
    res.send(toCsv(templateRows(unitsOf(req)), templateHeader(unitsOf(req))));
  }

  function exampleCsv(_req: Request, res: Response) {
    res.attachment('crowntip-registry-example.csv');
    res.send(toCsv(EXAMPLE_ROWS, EXAMPLE_HEADER));
  }

  /** Runs multer (unless app.ts already did) and turns its errors (size, type) into the page's or the script's answer. */
  function receiveUpload(req: Request, res: Response, next: NextFunction) {
    const parsed = res.locals.importUpload as { err?: unknown } | undefined;
    const after = (err?: unknown) => {
      if (!err) return next();
      if (err instanceof HttpError) return uploadFailed(req, res, err);
      const tooLarge = (err as { code?: string }).code === 'LIMIT_FILE_SIZE';
      uploadFailed(
        req,
        res,
        tooLarge
          ? new HttpError('too_large', `The file is larger than ${MAX_UPLOAD_BYTES / 1024 / 1024} MB. Split it into smaller files.`)
          : new HttpError('invalid', 'The upload could not be read. Choose the file and send it again.'),
      );
    };
    if (parsed) after(parsed.err);
    else upload(req, res, after);
  }

  async function storeUpload(req: Request, res: Response) {
    if (!req.file || !req.file.size) return uploadFailed(req, res, new HttpError('invalid', 'Choose a CSV file to upload.', { file: 'Choose a CSV file.' }));
    let meta: ImportMeta;
    try {
      ({ meta } = await imports.upload(contextOf(req), req.file.originalname, req.file.buffer));
    } catch (err) {
      if (err instanceof ImportFileError) return uploadFailed(req, res, new HttpError('invalid', err.message, { file: err.message }));
      // A full or unwritable disk (507/503) is said on the upload page, beside the file.
      if (err instanceof HttpError && err.status >= 500) return uploadFailed(req, res, err);
      throw err;
    }
    const url = previewUrl(meta.id);
    if (wantsJson(req)) res.status(201).json({ id: meta.id, previewUrl: url });
    else res.redirect(303, url);
  }

  async function previewPage(req: Request, res: Response) {
    const meta = await imports.load(contextOf(req).organisationId, idParam(req));
    if (meta.status === 'imported') return res.redirect(303, resultUrl(meta.id));
    const preview = await imports.preview(meta, req.query as Record<string, unknown>, unitsOf(req));
    await renderPreview(res, preview, 200, req.query.failed === '1');
  }

  async function renderPreview(res: Response, p: ImportPreview, status: number, failed: boolean) {
    const running = await imports.isRunning(p.meta.organisationId, p.meta.id);
    const { check, parsed, mapping } = p;
    const used = new Set(Object.values(mapping.columns).filter((i) => i !== null));
    const cropLabels = Object.fromEntries(p.crops.map((c) => [c.code, c.label]));
    const params = mappingToParams(mapping);
    res.status(status).render('registry/import-preview', {
      title: 'Check the import',
      meta: p.meta,
      headers: parsed.headers,
      delimiter: parsed.delimiter,
      bom: parsed.bom,
      rowCount: parsed.rows.length,
      mapping,
      params,
      columns: IMPORT_COLUMNS,
      columnLabel: (k: keyof typeof COLUMN_BY_KEY | null) => (k ? COLUMN_BY_KEY[k].label : 'File'),
      areaUnits: AREA_UNITS,
      rateUnits: RATE_UNITS,
      ignoredHeaders: parsed.headers.filter((h, i) => !used.has(i) && h !== ''),
      rows: check.rows.slice(0, PREVIEW_ROWS),
      fileProblems: check.fileProblems,
      problems: check.problems.slice(0, PAGE_PROBLEMS),
      problemTotal: check.problems.length,
      problemRows: new Set(check.problems.map((x) => x.line)).size,
      warnings: check.warnings.slice(0, PAGE_WARNINGS),
      warningTotal: check.warnings.length,
      newRanches: check.newRanches,
      newFieldCount: check.newFields.length,
      plantingsOnExistingFields: check.plantingsOnExistingFields,
      seasons: check.seasons,
      cropLabels,
      canImport: canImport(check),
      failed,
      running,
      errorsUrl: `${BASE}/${p.meta.id}/errors.csv?${new URLSearchParams(params)}`,
      num: formatUpTo,
    });
  }

  function statusBody(meta: ImportMeta, job: ImportJob | undefined) {
    const phase = job?.phase ?? (meta.status === 'imported' ? 'imported' : 'uploaded');
    const params = job ? mappingToParams(job.mapping) : meta.mapping ? mappingToParams(meta.mapping) : undefined;
    return {
      id: meta.id,
      phase,
      done: job?.done ?? (phase === 'imported' ? (meta.result?.rows ?? 0) : 0),
      total: job?.total ?? meta.result?.rows ?? 0,
      percent: job ? jobPercent(job) : phase === 'imported' ? 100 : 0,
      result: job?.result ?? meta.result ?? null,
      problemCount: job?.problemCount ?? null,
      message: phase === 'error' ? 'The import stopped on an error and nothing was written. Try again; if it happens again, the error is in the server log.' : null,
      previewUrl: previewUrl(meta.id, params, phase === 'failed' ? { failed: '1' } : {}),
      statusUrl: `${BASE}/${meta.id}/status`,
      resultUrl: resultUrl(meta.id),
    };
  }

  async function commit(req: Request, res: Response) {
    const form = parseForm(commitForm, req.body);
    if (!form.ok) throw new HttpError('invalid', form.errors.id, form.errors);
    const meta = await imports.load(contextOf(req).organisationId, form.value.id);
    const start = await imports.commit(meta, req.body as Record<string, unknown>, contextOf(req), unitsOf(req));
    if (start.kind === 'imported') {
      if (wantsJson(req)) return res.json(statusBody(start.meta, undefined));
      return res.redirect(303, resultUrl(meta.id));
    }
    const { job } = start;
    if (wantsJson(req)) return res.status(202).json(statusBody(meta, job));
    // Without JavaScript: wait for the job (on whichever server runs it), then show the result or the problems.
    const ended = await imports.waitFor(meta.organisationId, job);
    if (ended.phase === 'imported') return res.redirect(303, resultUrl(meta.id));
    if (ended.phase === 'failed') {
      const again = await imports.preview(await imports.load(meta.organisationId, meta.id), mappingToParams(ended.mapping), unitsOf(req));
      return renderPreview(res, again, 400, true);
    }
    if (ended.phase !== 'error') return res.redirect(303, previewUrl(meta.id, mappingToParams(ended.mapping)));
    ctx.logger.error({ message: ended.message, importId: meta.id }, 'registry import failed');
    throw new HttpError('internal', 'The import stopped on an error and nothing was written. Try again; if it happens again, the error is in the server log.');
  }

  async function status(req: Request, res: Response) {
    const meta = await imports.load(contextOf(req).organisationId, idParam(req));
    const job = await imports.latestJob(meta.organisationId, meta.id);
    res.set('Cache-Control', 'no-store').json(statusBody(meta, job));
  }

  async function resultPage(req: Request, res: Response) {
    const meta = await imports.load(contextOf(req).organisationId, idParam(req));
    const job = await imports.latestJob(meta.organisationId, meta.id);
    const result = meta.result ?? (job?.phase === 'imported' ? job.result : undefined);
    if (!result) return res.redirect(303, previewUrl(meta.id, meta.mapping && mappingToParams(meta.mapping)));
    res.render('registry/import-result', { title: 'Import finished', meta, result, ranchListUrl: RANCH_LIST_URL, seasonUrl, importUrl: BASE });
  }

  async function errorsCsv(req: Request, res: Response) {
    const meta = await imports.load(contextOf(req).organisationId, idParam(req));
    const { check, parsed, mapping } = await imports.preview(meta, req.query as Record<string, unknown>, unitsOf(req));
    const fileColumn = (k: keyof typeof COLUMN_BY_KEY | null) => {
      if (!k) return '';
      const i = mapping.columns[k];
      return i === null ? COLUMN_BY_KEY[k].label : `${COLUMN_BY_KEY[k].label} (“${parsed.headers[i]}”)`;
    };
    const rows = [
      ...check.fileProblems.map((p) => ['', fileColumn(p.column), '', p.message, 'problem']),
      ...check.problems.map((p) => [p.line, fileColumn(p.column), p.value, p.message, 'problem']),
      ...check.warnings.map((p) => [p.line, fileColumn(p.column), p.value, p.message, 'warning']),
    ].sort((a, b) => Number(a[0] || 0) - Number(b[0] || 0));
    const base = meta.fileName.replace(/\.[^.]*$/, '') || 'import';
    res.attachment(`${base}-problems.csv`);
    res.send(toCsv(rows, ['row', 'column', 'value', 'problem', 'severity']));
  }
}

/**
 * A plain HTML form (no script) carries its CSRF token in the multipart body, which lusca can only
 * read once parsed: app.ts runs this for the upload path before the CSRF check (as for the other
 * upload forms), for signed-in users only. The route then uses what it parsed.
 */
export const IMPORT_UPLOAD_PATHS = ['/registry/import/preview'];
export const importUploadBeforeCsrf: RequestHandler = (req, res, next) => {
  if (!req.user || !req.is('multipart/form-data')) return next();
  upload(req, res, (err?: unknown) => {
    res.locals.importUpload = { err };
    next();
  });
};

// The upload: memory storage (at most 5 MB), one file named "file", .csv or text only.
const upload = multer({
  storage: multer.memoryStorage(),
  limits: { fileSize: MAX_UPLOAD_BYTES, files: 1, fields: 20, parts: 25 },
  fileFilter(_req, file, cb) {
    const csvName = /\.(csv|txt)$/i.test(file.originalname);
    const textType = /^text\//.test(file.mimetype) || /^application\/(csv|vnd\.ms-excel)$/.test(file.mimetype);
    if (csvName || textType) cb(null, true);
    else cb(new HttpError('unsupported_type', 'Upload a .csv file: comma- or semicolon-separated text.'));
  },
}).single('file');
