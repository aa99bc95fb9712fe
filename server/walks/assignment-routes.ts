import { Router, type Request, type Response } from 'express';
import { z } from 'zod';
import type { AppContext } from '../app';
import { requireRole } from '../platform/guards';
import { validateBody } from '../platform/validation';
import { assignWalk, unassignWalk } from './service';
import { isoDate } from '../../shared/schemas/registry';
import { walkActor } from './routes';

const assignmentSchema = z.object({
  samplerId: z.string({ message: 'Choose a sampler.' }).min(1, 'Choose a sampler.').max(100),
  dueOn: isoDate.nullable().optional(),
});

/**
 * Walk assignments, under /api/plantings/:id/assignment: a clerk or admin asks a sampler to walk a
 * planting (PUT again changes the due date) or takes the request back. Mounted beside the registry's
 * /api/plantings router, which has no routes of these shapes.
 */
export function walkAssignmentsApi(ctx: AppContext): Router {
  const router = Router();
  const writers = requireRole('clerk', 'admin');

  const put = async (req: Request<{ id: string }>, res: Response) => {
    res.json(await assignWalk(ctx.db, walkActor(req), req.params.id, req.body));
  };
  const remove = async (req: Request<{ id: string; samplerId: string }>, res: Response) => {
    await unassignWalk(ctx.db, walkActor(req), req.params.id, req.params.samplerId);
    res.status(204).end();
  };

  router.put('/:id/assignment', writers, validateBody(assignmentSchema), put);
  router.delete('/:id/assignment/:samplerId', writers, remove);
  return router;
}
