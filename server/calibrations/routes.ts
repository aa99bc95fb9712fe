import { Router, type NextFunction, type Request, type Response } from 'express';
import type { z } from 'zod';
import type { AppContext } from '../platform/app-context';
import { contextOf } from '../platform/context';
import { can } from '../platform/permissions';
import { HttpError } from '../platform/errors';
import { validateBody, validateQuery } from '../platform/validation';
import { compareModels, fitCalibration } from '../../shared/calc';
import { currentCreditRule } from '../rules/public';
import * as calibrations from './service';
import { assignmentJson, calcErrorToHttp, calibrationJson, IMMUTABLE_MESSAGE } from './service';
import {
  assignmentBodySchema,
  assignmentQuerySchema,
  compareBodySchema,
  createBodySchema,
  fitBodySchema,
  listQuerySchema,
  patchBodySchema,
  publishBodySchema,
  tableQuerySchema,
} from './schemas';
import { lookupView, MAX_LOOKUP_PAGE_ROWS } from './view';

/**
 * /api/calibrations (README, "API"): everyone in the
 * organisation reads published versions; administrators make, publish, retire and assign them;
 * admin and clerk may try fits without saving. A published version never changes: any change
 * answers 409 `conflict`.
 */
export function calibrationsApi(ctx: AppContext): Router {
  const router = Router();
  const { db } = ctx;
  const admins = can('calibrations.publish');
  const fitters = can('calibrations.fit');
  const org = (req: Request) => contextOf(req).organisationId;
  const seesDrafts = (req: Request) => contextOf(req).can('calibrations.publish');

  /** Before a change is even validated: 404 if unknown here, 409 if no longer a draft. */
  const draftOnly = async (req: Request<{ id: string }>, _res: Response, next: NextFunction) => {
    const c = await calibrations.loadCalibration(db, org(req), req.params.id, { drafts: true });
    if (c.status !== 'draft') throw new HttpError('conflict', IMMUTABLE_MESSAGE);
    next();
  };

  const list = async (req: Request, res: Response) => {
    const q = res.locals.query as z.infer<typeof listQuerySchema>;
    if (q.status === 'draft' && !seesDrafts(req)) throw new HttpError('forbidden', 'Only administrators see draft calibrations.');
    const statuses: calibrations.CalibrationStatus[] =
      q.status === 'all' ? (seesDrafts(req) ? ['published', 'draft', 'retired'] : ['published', 'retired']) : [q.status];
    const { items, total } = await calibrations.listCalibrations(db, org(req), { statuses, crop: q.crop, limit: q.limit, offset: q.offset });
    res.json({ items: items.map(calibrationJson), total });
  };

  const show = async (req: Request<{ id: string }>, res: Response) => {
    const c = await calibrations.loadCalibration(db, org(req), req.params.id, { drafts: seesDrafts(req) });
    const dataset = await calibrations.getDataset(db, org(req), c.datasetId);
    const assignments = await calibrations.assignmentsOf(db, org(req), c.id);
    res.json({
      ...calibrationJson(c),
      assignments: assignments.map(assignmentJson),
      dataset: dataset && {
        id: dataset.id,
        name: dataset.name,
        fileName: dataset.fileName,
        lengthUnit: dataset.lengthUnit,
        biomassUnit: dataset.biomassUnit,
        rowCount: dataset.rowCount,
        uploadedBy: dataset.uploadedByName,
        createdAt: dataset.createdAt,
        points: dataset.points.map(({ line: _line, ...p }) => p),
      },
    });
  };

  const table = async (req: Request<{ id: string }>, res: Response) => {
    const q = res.locals.query as z.infer<typeof tableQuerySchema>;
    const c = await calibrations.loadCalibration(db, org(req), req.params.id, { drafts: seesDrafts(req) });
    if (!c.fit) throw new HttpError('conflict', 'No model could be fitted to this calibration’s points, so it has no table.');
    const rule = await currentCreditRule(db, org(req));
    const unit = q.unit ?? (contextOf(req).units === 'metric' ? 'cm' : 'in');
    let view;
    try {
      view = lookupView(c.fit, { unit, thresholdKgHa: rule.thresholdKgHa, from: q.from, to: q.to });
    } catch (e) {
      calcErrorToHttp(e, 'from');
    }
    if (view.rows.length > MAX_LOOKUP_PAGE_ROWS) throw new HttpError('invalid', 'That range makes too many rows.', { to: `At most ${MAX_LOOKUP_PAGE_ROWS} rows; choose a shorter range.` });
    res.json({
      calibrationId: c.id,
      version: c.version,
      unit: view.unit,
      step: view.step,
      thresholdKgHa: rule.thresholdKgHa,
      thresholdLengthCm: view.thresholdAt.ok ? view.thresholdAt.x : null,
      items: view.rows,
      total: view.rows.length,
    });
  };

  const fit = (req: Request, res: Response) => {
    const body = req.body as z.infer<typeof fitBodySchema>;
    try {
      res.json(fitCalibration(body.points, body.model));
    } catch (e) {
      calcErrorToHttp(e);
    }
  };

  const compare = (req: Request, res: Response) => {
    const body = req.body as z.infer<typeof compareBodySchema>;
    try {
      res.json(compareModels(body.points));
    } catch (e) {
      calcErrorToHttp(e);
    }
  };

  const create = async (req: Request, res: Response) => {
    const body = req.body as z.infer<typeof createBodySchema>;
    const points = body.points.map((p) => Object.fromEntries(Object.entries(p).filter(([, v]) => v != null)) as unknown as calibrations.DatasetPoint);
    const c = await calibrations.createDraft(db, contextOf(req), { ...body, fileName: null, points });
    res.status(201).json(calibrationJson(c));
  };

  const patch = async (req: Request<{ id: string }>, res: Response) => {
    res.json(calibrationJson(await calibrations.changeDraft(db, contextOf(req), req.params.id, req.body)));
  };

  const remove = async (req: Request<{ id: string }>, res: Response) => {
    await calibrations.deleteDraft(db, contextOf(req), req.params.id);
    res.status(204).end();
  };

  const publish = async (req: Request<{ id: string }>, res: Response) => {
    res.json(calibrationJson(await calibrations.publish(db, contextOf(req), req.params.id, req.body)));
  };

  const retire = async (req: Request<{ id: string }>, res: Response) => {
    res.json(calibrationJson(await calibrations.retire(db, contextOf(req), req.params.id)));
  };

  const draftFrom = async (req: Request<{ id: string }>, res: Response) => {
    res.status(201).json(calibrationJson(await calibrations.draftFrom(db, contextOf(req), req.params.id)));
  };

  const assignments = async (req: Request, res: Response) => {
    const items = await calibrations.listAssignments(db, org(req));
    res.json({ items: items.map(assignmentJson), total: items.length });
  };

  const putAssignment = async (req: Request, res: Response) => {
    res.json(assignmentJson(await calibrations.assign(db, contextOf(req), req.body)));
  };

  const deleteAssignment = async (req: Request, res: Response) => {
    const q = res.locals.query as z.infer<typeof assignmentQuerySchema>;
    await calibrations.unassign(db, contextOf(req), q.crop, q.variety ?? null);
    res.status(204).end();
  };

  router.get('/', can('calibrations.read'), validateQuery(listQuerySchema), list);
  router.post('/', admins, validateBody(createBodySchema), create);
  router.post('/fit', fitters, validateBody(fitBodySchema), fit);
  router.post('/compare', fitters, validateBody(compareBodySchema), compare);
  router.get('/assignments', can('calibrations.read'), assignments);
  router.put('/assignments', admins, validateBody(assignmentBodySchema), putAssignment);
  router.delete('/assignments', admins, validateQuery(assignmentQuerySchema), deleteAssignment);
  router.get('/:id', can('calibrations.read'), show);
  router.get('/:id/table', can('calibrations.read'), validateQuery(tableQuerySchema), table);
  router.patch('/:id', admins, draftOnly, validateBody(patchBodySchema), patch);
  router.put('/:id', admins, draftOnly, validateBody(patchBodySchema), patch);
  router.delete('/:id', admins, remove);
  router.post('/:id/publish', admins, draftOnly, validateBody(publishBodySchema), publish);
  router.post('/:id/retire', admins, retire);
  router.post('/:id/drafts', admins, draftFrom);
  return router;
}
