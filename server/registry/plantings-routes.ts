import { Router, type Request, type Response } from 'express';
import type { z } from 'zod';
import type { AppContext } from '../app';
import { requireRole, requireSignIn } from '../platform/guards';
import { HttpError } from '../platform/errors';
import { validateBody, validateQuery } from '../platform/validation';
import { getPlanting, listPlantings } from './plantings-db';
import { createPlanting, updatePlanting } from './service';
import { cropSchema, pagingSchema, plantingInputSchema, plantingPatchSchema, seasonSchema } from '../../shared/schemas/registry';
import { actorOf, idFilter, listQuery } from './route-helpers';

const listSchema = listQuery(
  pagingSchema.extend({
    fieldId: idFilter.optional(),
    ranchId: idFilter.optional(),
    season: seasonSchema.optional(),
    crop: cropSchema.optional(),
  }),
);

/** /api/plantings (../shared/API.md, Registry): everyone in the organisation reads, clerk and admin write. */
export function plantingsApi(ctx: AppContext): Router {
  const router = Router();
  const writers = requireRole('clerk', 'admin');

  const list = async (req: Request, res: Response) => {
    res.json(await listPlantings(ctx.db, req.user!.organisationId, res.locals.query as z.infer<typeof listSchema>));
  };

  const show = async (req: Request<{ id: string }>, res: Response) => {
    const planting = await getPlanting(ctx.db, req.user!.organisationId, req.params.id);
    if (!planting) throw new HttpError('not_found');
    res.json(planting);
  };

  // A field of another organisation is refused by the service as 400 on fieldId.
  const create = async (req: Request, res: Response) => {
    res.status(201).json(await createPlanting(ctx.db, actorOf(req), req.body));
  };

  const update = async (req: Request<{ id: string }>, res: Response) => {
    res.json(await updatePlanting(ctx.db, actorOf(req), req.params.id, req.body));
  };

  router.get('/', requireSignIn, validateQuery(listSchema), list);
  router.post('/', writers, validateBody(plantingInputSchema), create);
  router.get('/:id', requireSignIn, show);
  router.patch('/:id', writers, validateBody(plantingPatchSchema), update);
  return router;
}
