import { Router, type Request, type Response } from 'express';
import multer from 'multer';
import { z } from 'zod';
import type { AppContext } from '../platform/app-context';
import { contextOf } from '../platform/context';
import { can } from '../platform/permissions';
import { HttpError } from '../platform/errors';
import { parseForm } from '../platform/validation';
import { areasDisagree } from '../../shared/registry/boundary-area';
import { boundaryOutline } from '../../shared/registry/outline';
import { seasonLabel, seasonOfDate, seasonStartYear, seasonStarting, todayIso } from '../../shared/registry/season';
import { fieldInputSchema, plantingInputSchema, ranchInputSchema } from '../../shared/schemas/registry';
import * as registry from './service';
import { boundaryFromForm, renameErrors } from './forms';
import { BoundaryUploads } from './boundary-uploads';
import { boundaryImportPages } from './boundary-pages';
import { shapeLabel } from './boundary-files';
import { areaToHa, rateToKgHa } from '../platform/form-values';

/**
 * Field forms carry an optional boundary file (GeoJSON, KML, KMZ or a zipped shapefile). lusca checks the CSRF token before route handlers
 * run, and it can only read the token from a parsed body, so app.ts runs this parser ahead of
 * lusca for the two field-form paths (docs/server-notes.md, 3). Small files, memory only.
 */
export const boundaryUpload = multer({
  storage: multer.memoryStorage(),
  limits: { fileSize: 2 * 1024 * 1024, files: 1, fields: 20 },
}).single('boundaryFile');
export const FIELD_FORM_PATHS = ['/registry/fields', '/registry/fields/:id', '/registry/ranches/:id/boundaries'];

const PAGE = 50;
const writers = can('registry.write');
const canEdit = (req: Request) => Boolean(req.context?.can('registry.write'));
const org = (req: Request) => contextOf(req).organisationId;
const currentSeason = () => seasonOfDate(todayIso());

const ranchListQuery = z.object({
  q: z.string().trim().max(100).optional().catch(undefined),
  sort: z.enum(registry.RANCH_SORTS).default('name').catch('name'),
  dir: z.enum(['asc', 'desc']).default('asc').catch('asc'),
  page: z.coerce.number().int().min(1).default(1).catch(1),
});

/** Seasons offered in forms and filters: two back, the current one, one ahead. */
function seasonChoices(): string[] {
  const now = seasonStartYear(currentSeason());
  return [now + 1, now, now - 1, now - 2].map(seasonStarting);
}

/** Renders a form again after an error: status 400, the values typed, errors beside inputs. */
function rerender(res: Response, view: string, locals: Record<string, unknown>, err: unknown) {
  if (err instanceof HttpError && err.code === 'invalid') {
    res.status(400).render(view, { ...locals, errors: renameErrors(err.fields) });
    return;
  }
  throw err;
}

export function registryPages(ctx: AppContext): Router {
  const router = Router();
  const { db } = ctx;
  const uploads = new BoundaryUploads(ctx.files);
  router.use('/registry', can('registry.read'));
  router.use(boundaryImportPages(ctx, uploads));

  router.get('/registry', (_req, res) => res.redirect('/registry/ranches'));

  // Ranches -----------------------------------------------------------------------------------

  router.get('/registry/ranches', async (req, res) => {
    const query = ranchListQuery.parse(req.query);
    const season = currentSeason();
    const { items, total } = await registry.listRanches(db, org(req), {
      q: query.q || undefined,
      season,
      sort: query.sort,
      dir: query.dir,
      limit: PAGE,
      offset: (query.page - 1) * PAGE,
    });
    res.render('registry/ranches', { title: 'Ranches', ranches: items, total, query, pages: Math.max(1, Math.ceil(total / PAGE)), season, seasonLabel, canEdit: canEdit(req) });
  });

  const ranchFormLocals = (values: Record<string, unknown>, extra: Record<string, unknown> = {}) => ({ values, errors: {}, ...extra });

  router.get('/registry/ranches/new', writers, (_req, res) => {
    res.render('registry/ranch-form', { title: 'New ranch', ranch: null, ...ranchFormLocals({}) });
  });

  router.post('/registry/ranches', writers, async (req, res) => {
    const locals = { title: 'New ranch', ranch: null, ...ranchFormLocals(req.body ?? {}) };
    const parsed = parseForm(ranchInputSchema, req.body);
    if (!parsed.ok) return res.status(400).render('registry/ranch-form', { ...locals, errors: parsed.errors });
    try {
      const ranch = await registry.createRanch(db, contextOf(req), parsed.value);
      req.session.flash = { kind: 'info', text: `Ranch “${ranch.name}” added.` };
      res.redirect(`/registry/ranches/${ranch.id}`);
    } catch (err) {
      rerender(res, 'registry/ranch-form', locals, err);
    }
  });

  const loadRanch = async (req: Request) => {
    const ranch = await registry.getRanch(db, org(req), String(req.params.id), currentSeason());
    if (!ranch) throw new HttpError('not_found');
    return ranch;
  };

  router.get('/registry/ranches/:id', async (req, res) => {
    const ranch = await loadRanch(req);
    const season = currentSeason();
    const [{ items: fields }, { items: plantings }] = await Promise.all([
      registry.listFields(db, org(req), { ranchId: ranch.id, limit: 500, offset: 0 }),
      registry.listPlantings(db, org(req), { ranchId: ranch.id, season, limit: 500, offset: 0 }),
    ]);
    const plantingOf = new Map(plantings.map((p) => [p.fieldId, p]));
    res.render('registry/ranch', { title: ranch.name, ranch, fields, plantingOf, season, seasonLabel, canEdit: canEdit(req) });
  });

  router.get('/registry/ranches/:id/edit', writers, async (req, res) => {
    const ranch = await loadRanch(req);
    res.render('registry/ranch-form', { title: `Edit ${ranch.name}`, ranch, ...ranchFormLocals({ ...ranch, contactEmails: ranch.contactEmails.join(', ') }) });
  });

  router.post('/registry/ranches/:id', writers, async (req, res) => {
    const ranch = await loadRanch(req);
    const locals = { title: `Edit ${ranch.name}`, ranch, ...ranchFormLocals(req.body ?? {}) };
    const parsed = parseForm(ranchInputSchema, req.body);
    if (!parsed.ok) return res.status(400).render('registry/ranch-form', { ...locals, errors: parsed.errors });
    try {
      await registry.updateRanch(db, contextOf(req), ranch.id, { ...parsed.value, contactEmails: parsed.value.contactEmails ?? [] });
      req.session.flash = { kind: 'info', text: 'Ranch saved.' };
      res.redirect(`/registry/ranches/${ranch.id}`);
    } catch (err) {
      rerender(res, 'registry/ranch-form', locals, err);
    }
  });

  router.post('/registry/ranches/:id/delete', writers, async (req, res) => {
    const ranch = await loadRanch(req);
    await registry.deleteRanch(db, contextOf(req), ranch.id);
    req.session.flash = { kind: 'info', text: `Ranch “${ranch.name}” deleted.` };
    res.redirect('/registry/ranches');
  });

  // Fields ------------------------------------------------------------------------------------

  const fieldFormInput = async (req: Request) => {
    const body = req.body ?? {};
    const choice = await boundaryFromForm(uploads, org(req), req.file, body);
    const input: Record<string, unknown> = {
      ranchId: body.ranchId,
      name: body.name,
      areaHa: areaToHa(body.area, contextOf(req).units),
      notes: body.notes,
    };
    if (choice.boundary !== undefined) input.boundary = choice.boundary;
    return { input, choice };
  };

  const fieldFormLocals = async (req: Request, values: Record<string, unknown>, field: registry.Field | null) => ({
    title: field ? `Edit ${field.name}` : 'New field',
    field,
    values,
    errors: {} as Record<string, string>,
    ranches: await registry.ranchOptions(db, org(req)),
    choose: null as null | { id: string; fileName: string; options: { index: number; label: string; areaHa: number | null; problem: string | null }[]; picked: number | null },
  });

  /** The chooser beside the file input: every shape by its name attribute, with its area. */
  const chooserOf = (kept: NonNullable<Awaited<ReturnType<typeof fieldFormInput>>['choice']['choose']>, body: Record<string, unknown>) => {
    const options = kept.shapes.map((s) => ({ index: s.index, label: shapeLabel(s, kept.nameKeys[0]), areaHa: s.areaHa, problem: s.problem }));
    const typed = String(body.name ?? '').trim().toLowerCase();
    const picked = body.boundaryPick !== undefined && body.boundaryUpload === kept.id ? Number(body.boundaryPick) : (options.find((o) => !o.problem && typed && o.label.toLowerCase() === typed)?.index ?? null);
    return { id: kept.id, fileName: kept.fileName, options, picked };
  };

  router.get('/registry/fields/new', writers, async (req, res) => {
    res.render('registry/field-form', await fieldFormLocals(req, { ranchId: req.query.ranchId }, null));
  });

  const saveField = async (req: Request, res: Response, field: registry.Field | null) => {
    const locals = await fieldFormLocals(req, req.body ?? {}, field);
    const { input, choice } = await fieldFormInput(req);
    const schema = field ? fieldInputSchema.partial() : fieldInputSchema;
    const parsed = parseForm(schema, input);
    const errors = parsed.ok ? {} : renameErrors(parsed.errors);
    if (choice.problem) errors.boundaryFile = choice.problem;
    if (choice.choose) locals.choose = chooserOf(choice.choose, req.body ?? {});
    // Several shapes and none picked yet: show them, save nothing (not an error: a step).
    if (choice.pending && !choice.problem && parsed.ok) return res.render('registry/field-form', { ...locals, errors });
    if (!parsed.ok || choice.problem) return res.status(400).render('registry/field-form', { ...locals, errors });
    try {
      const saved = field
        ? await registry.updateField(db, contextOf(req), field.id, parsed.value)
        : await registry.createField(db, contextOf(req), parsed.value as z.infer<typeof fieldInputSchema>);
      req.session.flash = { kind: 'info', text: field ? 'Field saved.' : `Field “${saved.name}” added.` };
      res.redirect(`/registry/fields/${saved.id}`);
    } catch (err) {
      rerender(res, 'registry/field-form', locals, err);
    }
  };

  router.post('/registry/fields', writers, (req, res) => saveField(req, res, null));

  const loadField = async (req: Request) => {
    const field = await registry.getField(db, org(req), String(req.params.id));
    if (!field) throw new HttpError('not_found');
    return field;
  };

  router.get('/registry/fields/:id', async (req, res) => {
    const field = await loadField(req);
    const { items: plantings } = await registry.listPlantings(db, org(req), { fieldId: field.id, limit: 100, offset: 0 });
    res.render('registry/field', {
      title: field.name,
      field,
      plantings,
      outline: field.boundary ? boundaryOutline(field.boundary, { width: 320, height: 240, margin: 10 }) : null,
      areaWarning: field.boundaryAreaHa != null && areasDisagree(field.areaHa, field.boundaryAreaHa),
      seasonLabel,
      canEdit: canEdit(req),
    });
  });

  router.get('/registry/fields/:id/edit', writers, async (req, res) => {
    const field = await loadField(req);
    res.render('registry/field-form', await fieldFormLocals(req, { ranchId: field.ranchId, name: field.name, area: res.locals.fmt.areaValue(field.areaHa), notes: field.notes }, field));
  });

  router.post('/registry/fields/:id', writers, async (req, res) => saveField(req, res, await loadField(req)));

  // Plantings ---------------------------------------------------------------------------------

  const plantingFormInput = (req: Request, fieldId: string) => {
    const b = req.body ?? {};
    return {
      fieldId,
      season: b.season,
      crop: b.crop,
      variety: b.variety,
      seededOn: b.seededOn,
      seedingRateKgHa: rateToKgHa(b.seedingRate, contextOf(req).units),
      plannedTerminationOn: b.plannedTerminationOn || null,
      terminatedOn: b.terminatedOn || null,
      notes: b.notes,
    };
  };

  const plantingFormLocals = async (req: Request, field: registry.Field, planting: registry.Planting | null, values: Record<string, unknown>) => ({
    title: planting ? `Planting ${seasonLabel(planting.season)} on ${field.name}` : `New planting on ${field.name}`,
    field,
    planting,
    values,
    errors: {} as Record<string, string>,
    crops: await registry.listCrops(db),
    varieties: await registry.varietySuggestions(db, org(req)),
    seasons: seasonChoices(),
    seasonLabel,
  });

  router.get('/registry/plantings/new', writers, async (req, res) => {
    const field = await registry.getField(db, org(req), String(req.query.fieldId ?? ''));
    if (!field) throw new HttpError('not_found', 'Open a field first, then add its planting.');
    res.render('registry/planting-form', await plantingFormLocals(req, field, null, { season: currentSeason() }));
  });

  const savePlanting = async (req: Request, res: Response, field: registry.Field, planting: registry.Planting | null) => {
    const locals = await plantingFormLocals(req, field, planting, req.body ?? {});
    const parsed = parseForm(plantingInputSchema, plantingFormInput(req, field.id));
    if (!parsed.ok) return res.status(400).render('registry/planting-form', { ...locals, errors: renameErrors(parsed.errors) });
    try {
      const saved = planting
        ? await registry.updatePlanting(db, contextOf(req), planting.id, parsed.value)
        : await registry.createPlanting(db, contextOf(req), parsed.value);
      req.session.flash = { kind: 'info', text: `Planting ${seasonLabel(saved.season)} saved.` };
      res.redirect(`/registry/fields/${field.id}`);
    } catch (err) {
      rerender(res, 'registry/planting-form', locals, err);
    }
  };

  router.post('/registry/plantings', writers, async (req, res) => {
    const field = await registry.getField(db, org(req), String(req.body?.fieldId ?? ''));
    if (!field) throw new HttpError('invalid', 'Choose one of your fields.', { fieldId: 'Choose one of your fields.' });
    await savePlanting(req, res, field, null);
  });

  const loadPlanting = async (req: Request) => {
    const planting = await registry.getPlanting(db, org(req), String(req.params.id));
    if (!planting) throw new HttpError('not_found');
    const field = (await registry.getField(db, org(req), planting.fieldId))!;
    return { planting, field };
  };

  router.get('/registry/plantings/:id/edit', writers, async (req, res) => {
    const { planting, field } = await loadPlanting(req);
    const values = { ...planting, seedingRate: res.locals.fmt.rateValue(planting.seedingRateKgHa) };
    res.render('registry/planting-form', await plantingFormLocals(req, field, planting, values));
  });

  router.post('/registry/plantings/:id', writers, async (req, res) => {
    const { planting, field } = await loadPlanting(req);
    await savePlanting(req, res, field, planting);
  });

  return router;
}
