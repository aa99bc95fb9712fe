import { Router, type Request, type Response } from 'express';
import { z } from 'zod';
import type { AppContext } from '../platform/app-context';
import { contextOf } from '../platform/context';
import { can } from '../platform/permissions';
import { HttpError } from '../platform/errors';
import { validateBody, validateQuery } from '../platform/validation';
import { getPlanting, listPlantings } from './service';
import { createPlanting, updatePlanting } from './service';
import { cropSchema, pagingSchema, plantingInputSchema, plantingPatchSchema, seasonSchema } from '../../shared/schemas/registry';
import { idFilter, listQuery } from '../platform/query';

const listSchema = listQuery(
  pagingSchema.extend({
    fieldId: idFilter.optional(),
    ranchId: idFilter.optional(),
    season: seasonSchema.optional(),
    crop: cropSchema.optional(),
  }),
);

/**
 * /api/plantings (README, "API"): everyone in the organisation reads, clerk and admin
 * write. Walk assignments under /api/plantings/:id/assignment are field walks' own
 * (server/walks/assignments-routes.ts).
 */
export function plantingsApi(ctx: AppContext): Router {
  const router = Router();
  const writers = can('registry.write');

  const list = async (req: Request, res: Response) => {
    res.json(await listPlantings(ctx.db, contextOf(req).organisationId, res.locals.query as z.infer<typeof listSchema>));
  };

  const show = async (req: Request<{ id: string }>, res: Response) => {
    const planting = await getPlanting(ctx.db, contextOf(req).organisationId, req.params.id);
    if (!planting) throw new HttpError('not_found');
    res.json(planting);
  };

  // A field of another organisation is refused by the service as 400 on fieldId.
  const create = async (req: Request, res: Response) => {
    res.status(201).json(await createPlanting(ctx.db, contextOf(req), req.body));
  };

  const update = async (req: Request<{ id: string }>, res: Response) => {
    res.json(await updatePlanting(ctx.db, contextOf(req), req.params.id, req.body));
  };

  router.get('/', can('registry.read'), validateQuery(listSchema), list);
  router.post('/', writers, validateBody(plantingInputSchema), create);
  router.get('/:id', can('registry.read'), show);
  router.patch('/:id', writers, validateBody(plantingPatchSchema), update);
  return router;
}
