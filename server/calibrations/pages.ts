import path from 'node:path';
import { Router, type NextFunction, type Request, type RequestHandler, type Response } from 'express';
import multer from 'multer';
import { z } from 'zod';
import type { AppContext } from '../platform/app-context';
import { contextOf } from '../platform/context';
import { can } from '../platform/permissions';
import { HttpError } from '../platform/errors';
import { parseForm } from '../platform/validation';
import { decodeUtf8, CsvReadError } from '../platform/csv-read';
import { toCsv } from '../platform/csv-safe';
import type { Formatter } from '../platform/format';
import { BIOMASS_UNITS, LENGTH_UNITS } from './service';
import { listCrops } from '../registry/public';
import { currentCreditRule } from '../rules/public';
import * as calibrations from './service';
import {
  BIOMASS_UNIT_LABELS,
  LENGTH_UNIT_LABELS,
  MAX_POINTS,
  MAX_UPLOAD_BYTES,
  MIN_POINTS,
  checkCalibrationCsv,
  isBiomassUnit,
  isLengthUnit,
} from './import';
import { BAND_LEVEL, biomassOut, displayUnitsOf, lengthOut, type DisplayUnits } from './charts';
import { COEFFICIENT_NAMES, MODEL_LABELS, fitPageView, isModel, lookupView, LOOKUP_STEPS, MAX_LOOKUP_PAGE_ROWS } from './view';
import { cropSchema, labelSchema, modelSchema, tableQuerySchema } from './schemas';
import { renderChart } from '../../shared/charts/svg';
import { MODELS } from '../../shared/calc';
import { sig } from '../../shared/calc/format';

/**
 * The upload form's file is parsed before the CSRF check, which can only read the token from a
 * parsed body (docs/server-notes.md, 3): app.ts runs this ahead of lusca for the upload path.
 * Memory only and size-limited; a file over the limit is reported on the form, not as a bare 413
 * (the form puts _csrf before the file, so the token is read even then). Signed-out posts are not
 * parsed at all.
 */
const multerSingle = multer({
  storage: multer.memoryStorage(),
  limits: { fileSize: MAX_UPLOAD_BYTES, files: 1, fields: 10 },
}).single('file');

export const CALIBRATION_UPLOAD_PATHS = ['/calibrations/uploads'];

export const calibrationUpload: RequestHandler = (req, res, next) => {
  if (!req.user) return next();
  multerSingle(req, res, (err?: unknown) => {
    if (err) {
      const code = (err as { code?: string }).code;
      res.locals.uploadError =
        code === 'LIMIT_FILE_SIZE'
          ? `The file is larger than ${MAX_UPLOAD_BYTES / 1024 / 1024} MB. Split it into smaller files, or remove columns that are not needed.`
          : 'The upload could not be read. Choose the file again.';
    }
    next();
  });
};

const units = (v: unknown) => (isLengthUnit(v) ? v : null);
const bunits = (v: unknown) => (isBiomassUnit(v) ? v : null);

const previewFormSchema = z.object({
  crop: cropSchema,
  variety: z.string().trim().max(200, 'Use at most 200 characters.').optional(),
  region: z.string().trim().max(200, 'Use at most 200 characters.').optional(),
  name: z.string({ message: 'Name the data set.' }).trim().min(1, 'Name the data set.').max(200, 'Use at most 200 characters.'),
  lengthUnit: z.enum(LENGTH_UNITS, { message: 'Choose the unit of the length column.' }),
  biomassUnit: z.enum(BIOMASS_UNITS, { message: 'Choose the unit of the biomass column.' }),
});

const publishFormSchema = z.object({
  model: modelSchema,
  label: labelSchema,
  assign: z.literal('yes').optional(),
});

const assignFormSchema = z.object({
  crop: cropSchema,
  variety: z.string().trim().max(200, 'Use at most 200 characters.').optional(),
  calibrationId: z.string({ message: 'Choose a calibration.' }).min(1, 'Choose a calibration.'),
});

const TEMPLATE_HEADER = ['length_cm', 'biomass_kg_ha', 'site', 'date', 'stage', 'note'];

/** Number helpers in the reader's units, for the views. */
function unitsHelpers(fmt: Formatter) {
  const u: DisplayUnits = displayUnitsOf(fmt.units);
  const other: DisplayUnits = displayUnitsOf(fmt.units === 'us' ? 'metric' : 'us');
  return {
    u,
    lengthUnit: u.length,
    biomassUnit: fmt.rateUnit,
    /** 79.3 cm → "31.2 in" for a US reader. */
    len: (cm: number, digits = 1) => `${fmt.number(lengthOut(cm, u), digits)} ${u.length}`,
    /** Both systems: "31.2 in (79.3 cm)". */
    lenBoth: (cm: number, digits = 1) => `${fmt.number(lengthOut(cm, u), digits)} ${u.length} (${fmt.number(lengthOut(cm, other), digits)} ${other.length})`,
    bio: (kgHa: number | null | undefined) => fmt.rate(kgHa),
    bioValue: (kgHa: number) => biomassOut(kgHa, u),
    range: (r: [number, number]) => `${fmt.number(lengthOut(r[0], u), 1)}–${fmt.number(lengthOut(r[1], u), 1)} ${u.length}`,
  };
}

export function calibrationPages(ctx: AppContext): Router {
  const router = Router();
  const { db } = ctx;
  const admins = can('calibrations.publish');
  const org = (req: Request) => contextOf(req).organisationId;
  const isAdmin = (req: Request) => contextOf(req).can('calibrations.publish');

  router.use('/calibrations', can('calibrations.read'), (_req: Request, res: Response, next: NextFunction) => {
    res.locals.cu = unitsHelpers(res.locals.fmt as Formatter);
    res.locals.modelLabels = MODEL_LABELS;
    res.locals.sig = sig;
    next();
  });

  // List ----------------------------------------------------------------------------------------

  router.get('/calibrations', async (req, res) => {
    const statuses: calibrations.CalibrationStatus[] = isAdmin(req) ? ['published', 'draft', 'retired'] : ['published', 'retired'];
    const { items } = await calibrations.listCalibrations(db, org(req), { statuses, limit: 500, offset: 0 });
    const assignments = await calibrations.listAssignments(db, org(req));
    res.render('calibrations/list', { title: 'Calibrations', calibrations: items, assignments, canManage: isAdmin(req) });
  });

  // Upload, preview, save -----------------------------------------------------------------------

  router.get('/calibrations/new', admins, async (_req, res) => {
    res.render('calibrations/new', { title: 'New calibration', errors: {}, maxBytes: MAX_UPLOAD_BYTES, maxMb: MAX_UPLOAD_BYTES / 1024 / 1024, maxRows: MAX_POINTS, minRows: MIN_POINTS });
  });

  router.get('/calibrations/template.csv', admins, (_req, res) => {
    res.type('text/csv; charset=utf-8');
    res.attachment('crowntip-calibration-points.csv');
    res.send(toCsv([], TEMPLATE_HEADER));
  });

  // The page's script (client/office.ts, data-import-upload, shared with the registry import)
  // sends the file by XMLHttpRequest for upload progress and asks for JSON; a plain form post
  // (no script) gets the page itself.
  router.post('/calibrations/uploads', admins, async (req, res) => {
    const wantsJson = req.accepts(['html', 'json']) === 'json';
    const fail = (message: string) =>
      wantsJson
        ? res.status(400).json({ error: { code: 'invalid', message, fields: { file: message } } })
        : res.status(400).render('calibrations/new', { title: 'New calibration', errors: { file: message }, maxBytes: MAX_UPLOAD_BYTES, maxMb: MAX_UPLOAD_BYTES / 1024 / 1024, maxRows: MAX_POINTS, minRows: MIN_POINTS });
    if (res.locals.uploadError) return fail(res.locals.uploadError as string);
    const file = req.file;
    if (!file || file.size === 0) return fail('Choose a CSV file to upload.');
    let content: string;
    try {
      content = decodeUtf8(file.buffer);
    } catch (e) {
      if (e instanceof CsvReadError) return fail(e.message);
      throw e;
    }
    const id = await calibrations.insertUpload(db, org(req), { uploadedBy: contextOf(req).id, fileName: path.basename(file.originalname || 'upload.csv'), content, byteSize: file.size });
    if (wantsJson) return res.json({ previewUrl: `/calibrations/uploads/${id}` });
    res.redirect(303, `/calibrations/uploads/${id}`);
  });

  const loadUpload = async (req: Request) => {
    const upload = await calibrations.getUpload(db, org(req), String(req.params.id));
    if (!upload) throw new HttpError('not_found', 'This upload is no longer here (uploads are kept for a day). Upload the file again.');
    return upload;
  };

  const renderPreview = async (req: Request, res: Response, upload: calibrations.Upload, values: Record<string, unknown>, errors: Record<string, string>, status = 200) => {
    const check = checkCalibrationCsv(upload.content, { lengthUnit: units(values.lengthUnit), biomassUnit: bunits(values.biomassUnit) });
    const crops = await listCrops(db);
    const cu = res.locals.cu as ReturnType<typeof unitsHelpers>;
    const chart =
      check.points.length > 0
        ? renderChart({
            id: 'preview',
            title: 'The uploaded points',
            description: `${check.points.length} paired points, mean main shoot length against oven-dry shoot biomass, in your units.`,
            xAxis: { label: `Mean main shoot length (${cu.lengthUnit})`, include: 0 },
            yAxis: { label: `Oven-dry shoot biomass (${cu.biomassUnit})`, include: 0 },
            layers: [{ kind: 'points', label: `Points (n = ${check.points.length})`, points: check.points.map((p) => ({ x: lengthOut(p.x, cu.u), y: biomassOut(p.y, cu.u) })) }],
            height: 320,
            className: 'w-full h-auto',
          })
        : null;
    res.status(status).render('calibrations/preview', {
      title: `Check ${upload.fileName}`,
      upload,
      check,
      chart,
      crops,
      values: { lengthUnit: check.lengthUnit ?? '', biomassUnit: check.biomassUnit ?? '', ...values },
      errors: { ...check.unitErrors, ...errors },
      lengthUnitLabels: LENGTH_UNIT_LABELS,
      biomassUnitLabels: BIOMASS_UNIT_LABELS,
    });
  };

  router.get('/calibrations/uploads/:id', admins, async (req, res) => {
    const upload = await loadUpload(req);
    const name = upload.fileName.replace(/\.(csv|txt)$/i, '');
    await renderPreview(req, res, upload, { name }, {});
  });

  router.post('/calibrations/uploads/:id', admins, async (req, res) => {
    const upload = await loadUpload(req);
    const body = (req.body ?? {}) as Record<string, unknown>;
    if (body.action === 'check') return renderPreview(req, res, upload, body, {});
    const parsed = parseForm(previewFormSchema, body);
    const check = checkCalibrationCsv(upload.content, { lengthUnit: units(body.lengthUnit), biomassUnit: bunits(body.biomassUnit) });
    if (!parsed.ok || !check.ok) {
      const errors = parsed.ok ? {} : parsed.errors;
      if (!check.ok && !errors._) errors._ = 'Nothing was saved: correct the file or the choices below, then save again.';
      return renderPreview(req, res, upload, body, errors, 400);
    }
    const v = parsed.value;
    let created;
    try {
      created = await calibrations.createDraft(db, contextOf(req), {
        crop: v.crop,
        variety: v.variety || null,
        region: v.region || null,
        name: v.name,
        fileName: upload.fileName,
        lengthUnit: v.lengthUnit,
        biomassUnit: v.biomassUnit,
        points: check.points,
      });
    } catch (e) {
      if (e instanceof HttpError && e.code === 'invalid') return renderPreview(req, res, upload, body, { ...(e.fields ?? {}), _: e.message }, 400);
      throw e;
    }
    await calibrations.deleteUpload(db, org(req), upload.id);
    req.session.flash = { kind: 'info', text: `${check.points.length} points saved as a draft calibration for ${created.cropLabel}. Compare the models, then publish.` };
    res.redirect(303, `/calibrations/${created.id}`);
  });

  // Which calibration applies -------------------------------------------------------------------

  const renderAssignments = async (req: Request, res: Response, values: Record<string, unknown>, errors: Record<string, string>, status = 200) => {
    const [assignments, crops, { items: published }] = await Promise.all([
      calibrations.listAssignments(db, org(req)),
      listCrops(db),
      calibrations.listCalibrations(db, org(req), { statuses: ['published'], limit: 500, offset: 0 }),
    ]);
    res.status(status).render('calibrations/assignments', { title: 'Which calibration applies', assignments, crops, published, values, errors, canManage: isAdmin(req) });
  };

  router.get('/calibrations/assignments', async (req, res) => {
    const crop = typeof req.query.crop === 'string' ? req.query.crop : '';
    await renderAssignments(req, res, { crop }, {});
  });

  router.post('/calibrations/assignments', admins, async (req, res) => {
    const parsed = parseForm(assignFormSchema, req.body);
    if (!parsed.ok) return renderAssignments(req, res, req.body ?? {}, parsed.errors, 400);
    try {
      const a = await calibrations.assign(db, contextOf(req), parsed.value);
      req.session.flash = { kind: 'info', text: `${a.cropLabel}${a.variety ? ` ${a.variety}` : ''} estimates now use version ${a.version} (${a.label}).` };
      res.redirect(303, '/calibrations/assignments');
    } catch (e) {
      if (e instanceof HttpError && e.code === 'invalid') return renderAssignments(req, res, req.body ?? {}, e.fields ?? {}, 400);
      throw e;
    }
  });

  router.post('/calibrations/assignments/remove', admins, async (req, res) => {
    const crop = String(req.body?.crop ?? '');
    const variety = String(req.body?.variety ?? '') || null;
    await calibrations.unassign(db, contextOf(req), crop, variety);
    req.session.flash = { kind: 'info', text: 'Assignment removed: estimates for it have no calibration until you choose one.' };
    res.redirect(303, '/calibrations/assignments');
  });

  // One calibration: fit page, lookup table, points -----------------------------------------------

  const load = (req: Request) => calibrations.loadCalibration(db, org(req), String(req.params.id), { drafts: isAdmin(req) });

  const renderFitPage = async (req: Request, res: Response, c: calibrations.Calibration, form: { values: Record<string, unknown>; errors: Record<string, string> }, status = 200) => {
    const dataset = (await calibrations.getDataset(db, org(req), c.datasetId))!;
    const rule = await currentCreditRule(db, org(req));
    const cu = res.locals.cu as ReturnType<typeof unitsHelpers>;
    const asked = typeof req.query.model === 'string' && isModel(req.query.model) ? req.query.model : isModel(form.values.model) ? form.values.model : undefined;
    const view = fitPageView(c, dataset.points, { model: asked, units: cu.u, thresholdKgHa: rule.thresholdKgHa });
    const assignments = await calibrations.assignmentsOf(db, org(req), c.id);
    const existing = (await calibrations.listAssignments(db, org(req))).find((a) => a.crop === c.crop && (a.variety ?? '').toLowerCase() === (c.variety ?? '').toLowerCase());
    res.status(status).render('calibrations/show', {
      title: `${c.cropLabel}${c.variety ? ` ${c.variety}` : ''} calibration${c.version ? ` v${c.version}` : ' (draft)'}`,
      c,
      dataset,
      view,
      rule,
      assignments,
      existingAssignment: existing ?? null,
      canManage: isAdmin(req),
      coefficientNames: COEFFICIENT_NAMES,
      models: MODELS,
      bandLevel: BAND_LEVEL,
      values: { model: view.chosenModel ?? '', label: '', assign: existing ? '' : 'yes', ...form.values },
      errors: form.errors,
    });
  };

  router.get('/calibrations/:id', async (req, res) => {
    await renderFitPage(req, res, await load(req), { values: {}, errors: {} });
  });

  router.get('/calibrations/:id/table', async (req, res) => {
    const c = await load(req);
    if (!c.fit) throw new HttpError('conflict', 'No model could be fitted to these points, so there is no table.');
    const q = tableQuerySchema.safeParse(req.query);
    const query = q.success ? q.data : {};
    const unit = query.unit ?? (contextOf(req).units === 'metric' ? 'cm' : 'in');
    const rule = await currentCreditRule(db, org(req));
    let view = lookupView(c.fit, { unit, thresholdKgHa: rule.thresholdKgHa, from: query.from, to: query.to });
    let rangeNote: string | null = null;
    if (view.rows.length > MAX_LOOKUP_PAGE_ROWS) {
      view = lookupView(c.fit, { unit, thresholdKgHa: rule.thresholdKgHa });
      rangeNote = `That range would need more than ${MAX_LOOKUP_PAGE_ROWS} rows; the table shows the calibrated lengths instead.`;
    }
    const dataset = (await calibrations.getDataset(db, org(req), c.datasetId))!;
    res.render('calibrations/table', { title: `Lookup table: ${c.cropLabel}${c.version ? ` v${c.version}` : ' (draft)'}`, c, dataset, view, rule, steps: LOOKUP_STEPS, rangeNote, printedOn: new Date().toISOString() });
  });

  router.get('/calibrations/:id/points.csv', async (req, res) => {
    const c = await load(req);
    const dataset = (await calibrations.getDataset(db, org(req), c.datasetId))!;
    res.type('text/csv; charset=utf-8');
    res.attachment(`calibration-${c.crop}${c.version ? `-v${c.version}` : '-draft'}-points.csv`);
    res.send(toCsv(dataset.points.map((p) => ({ length_cm: p.x, biomass_kg_ha: p.y, site: p.site, date: p.date, stage: p.stage, note: p.note })), TEMPLATE_HEADER));
  });

  router.post('/calibrations/:id/publish', admins, async (req, res) => {
    const c = await load(req);
    if (c.status !== 'draft') throw new HttpError('conflict', calibrations.IMMUTABLE_MESSAGE);
    const parsed = parseForm(publishFormSchema, req.body);
    if (!parsed.ok) return renderFitPage(req, res, c, { values: req.body ?? {}, errors: parsed.errors }, 400);
    // Publishing is for good: confirmed on a page without script, in the form's dialog with it (client/office.ts).
    if (req.body?.confirmed !== 'yes') {
      const what = `${c.cropLabel}${c.variety ? ` ${c.variety}` : ''}${c.region ? `, ${c.region}` : ''}`;
      return res.render('confirm', {
        title: 'Publish this calibration?',
        heading: `Publish the ${what} calibration?`,
        lines: [
          `Model: ${MODEL_LABELS[parsed.value.model] ?? parsed.value.model}; name: “${parsed.value.label}”.`,
          'It becomes the next version and never changes afterwards: a correction is a new version.',
          parsed.value.assign === 'yes' ? `${what} field-walk estimates use it from now on.` : 'Estimates do not use it until it is chosen under “Which calibration applies”.',
        ],
        action: `/calibrations/${c.id}/publish`,
        fields: { model: parsed.value.model, label: parsed.value.label, ...(parsed.value.assign ? { assign: 'yes' } : {}) },
        confirmLabel: 'Publish now',
        cancelHref: `/calibrations/${c.id}`,
      });
    }
    try {
      const done = await calibrations.publish(db, contextOf(req), c.id, { model: parsed.value.model, label: parsed.value.label, assign: parsed.value.assign === 'yes' });
      req.session.flash = { kind: 'info', text: `Published as version ${done.version} (${done.label}).${done.assigned ? ` ${done.cropLabel} estimates now use it.` : ''}` };
      res.redirect(303, `/calibrations/${c.id}`);
    } catch (e) {
      if (e instanceof HttpError && e.code === 'invalid') return renderFitPage(req, res, c, { values: req.body ?? {}, errors: e.fields ?? {} }, 400);
      throw e;
    }
  });

  router.post('/calibrations/:id/retire', admins, async (req, res) => {
    const c = await load(req);
    try {
      const done = await calibrations.retire(db, contextOf(req), c.id);
      req.session.flash = { kind: 'info', text: `Version ${done.version} retired. It stays readable, and estimates made with it keep it.` };
    } catch (e) {
      if (!(e instanceof HttpError && e.code === 'conflict')) throw e;
      req.session.flash = { kind: 'error', text: e.message };
    }
    res.redirect(303, `/calibrations/${c.id}`);
  });

  router.post('/calibrations/:id/delete', admins, async (req, res) => {
    const c = await load(req);
    await calibrations.deleteDraft(db, contextOf(req), c.id);
    req.session.flash = { kind: 'info', text: 'Draft deleted.' };
    res.redirect(303, '/calibrations');
  });

  router.post('/calibrations/:id/drafts', admins, async (req, res) => {
    const draft = await calibrations.draftFrom(db, contextOf(req), (await load(req)).id);
    req.session.flash = { kind: 'info', text: 'A new draft with the same points: choose the model and publish it as the next version.' };
    res.redirect(303, `/calibrations/${draft.id}`);
  });

  return router;
}
