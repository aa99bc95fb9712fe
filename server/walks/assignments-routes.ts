import { Router, type Request, type Response } from 'express';
import { z } from 'zod';
import type { AppContext } from '../platform/app-context';
import { contextOf } from '../platform/context';
import { can } from '../platform/permissions';
import { validateBody } from '../platform/validation';
import { isoDate } from '../../shared/schemas/registry';
import { assignWalk, unassignWalk } from './assignments-service';

const assignmentSchema = z.object({
  samplerId: z.string({ message: 'Choose a sampler.' }).min(1, 'Choose a sampler.').max(100),
  dueOn: isoDate.nullable().optional(),
});

/**
 * Walk assignments, mounted under /api/plantings (README, "API"): a clerk or admin asks a sampler
 * to walk a planting with PUT /api/plantings/:id/assignment (PUT again changes the due date) and
 * takes the request back with DELETE /api/plantings/:id/assignment/:samplerId.
 */
export function assignmentsApi(ctx: AppContext): Router {
  const router = Router();

  const assign = async (req: Request<{ id: string }>, res: Response) => {
    res.json(await assignWalk(ctx.db, contextOf(req), req.params.id, req.body));
  };
  const unassign = async (req: Request<{ id: string; samplerId: string }>, res: Response) => {
    await unassignWalk(ctx.db, contextOf(req), req.params.id, req.params.samplerId);
    res.status(204).end();
  };

  router.put('/:id/assignment', can('walks.assign'), validateBody(assignmentSchema), assign);
  router.delete('/:id/assignment/:samplerId', can('walks.assign'), unassign);
  return router;
}
