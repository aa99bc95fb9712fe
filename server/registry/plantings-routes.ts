import { Router, type Request, type Response } from 'express';
import { z } from 'zod';
import type { AppContext } from '../platform/app-context';
import { requireRole, requireSignIn } from '../platform/guards';
import { HttpError } from '../platform/errors';
import { validateBody, validateQuery } from '../platform/validation';
import { getPlanting, listPlantings } from './plantings-db';
import { createPlanting, updatePlanting } from './service';
import { assignWalk, unassignWalk } from '../walks/public';
import { cropSchema, isoDate, pagingSchema, plantingInputSchema, plantingPatchSchema, seasonSchema } from '../../shared/schemas/registry';
import { actorOf, idFilter, listQuery } from './route-helpers';

const listSchema = listQuery(
  pagingSchema.extend({
    fieldId: idFilter.optional(),
    ranchId: idFilter.optional(),
    season: seasonSchema.optional(),
    crop: cropSchema.optional(),
  }),
);

const assignmentSchema = z.object({
  samplerId: z.string({ message: 'Choose a sampler.' }).min(1, 'Choose a sampler.').max(100),
  dueOn: isoDate.nullable().optional(),
});

/**
 * /api/plantings (../shared/API.md, Registry): everyone in the organisation reads, clerk and admin
 * write. Walk assignments live under /api/plantings/:id/assignment: a clerk or admin asks a sampler
 * to walk a planting (PUT again changes the due date) or takes the request back.
 */
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

  const walkActor = (req: Request) => ({ id: req.user!.id, organisationId: req.user!.organisationId, role: req.user!.role });
  const assign = async (req: Request<{ id: string }>, res: Response) => {
    res.json(await assignWalk(ctx.db, walkActor(req), req.params.id, req.body));
  };
  const unassign = async (req: Request<{ id: string; samplerId: string }>, res: Response) => {
    await unassignWalk(ctx.db, walkActor(req), req.params.id, req.params.samplerId);
    res.status(204).end();
  };

  router.get('/', requireSignIn, validateQuery(listSchema), list);
  router.post('/', writers, validateBody(plantingInputSchema), create);
  router.get('/:id', requireSignIn, show);
  router.patch('/:id', writers, validateBody(plantingPatchSchema), update);
  router.put('/:id/assignment', writers, validateBody(assignmentSchema), assign);
  router.delete('/:id/assignment/:samplerId', writers, unassign);
  return router;
}
