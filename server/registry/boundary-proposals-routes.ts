import { Router, type Request, type Response } from 'express';
import { z } from 'zod';
import type { AppContext } from '../platform/app-context';
import { contextOf } from '../platform/context';
import { can } from '../platform/permissions';
import { validateBody, validateQuery } from '../platform/validation';
import { boundaryDeclineSchema, boundaryProposalCreateSchema, boundaryProposalStatusSchema } from '../../shared/schemas/boundary-proposals';
import * as service from './boundary-proposals-service';

const listSchema = z.object({ status: boundaryProposalStatusSchema.optional() }).strict();

/**
 * /api/fields/:id/boundary-proposals (README, "Traced boundaries"): samplers, clerks and admins
 * send an outline traced on the phone; everyone in the organisation reads them; clerks and admins
 * accept or decline.
 */
export function boundaryProposalsApi(ctx: AppContext): Router {
  const router = Router();
  type P = Request<{ id: string; proposalId: string }>;

  router.get('/:id/boundary-proposals', can('registry.read'), validateQuery(listSchema), async (req: P, res: Response) => {
    const items = await service.listProposals(ctx.db, contextOf(req), req.params.id, (res.locals.query as z.infer<typeof listSchema>).status);
    res.json({ items, total: items.length });
  });
  router.post('/:id/boundary-proposals', can('boundaries.propose'), validateBody(boundaryProposalCreateSchema), async (req: P, res: Response) => {
    const { proposal, created } = await service.proposeBoundary(ctx.db, contextOf(req), req.params.id, req.body);
    res.status(created ? 201 : 200).json(proposal);
  });
  router.post('/:id/boundary-proposals/:proposalId/accept', can('registry.write'), async (req: P, res: Response) => {
    res.json(await service.acceptProposal(ctx.db, contextOf(req), req.params.id, req.params.proposalId));
  });
  router.post('/:id/boundary-proposals/:proposalId/decline', can('registry.write'), validateBody(boundaryDeclineSchema), async (req: P, res: Response) => {
    res.json(await service.declineProposal(ctx.db, contextOf(req), req.params.id, req.params.proposalId, req.body.reason));
  });
  return router;
}
