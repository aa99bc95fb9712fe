import { Router, type Request, type Response, type NextFunction } from 'express';
import type { AppContext } from '../platform/app-context';
import { contextOf } from '../platform/context';
import { can } from '../platform/permissions';
import { HttpError } from '../platform/errors';
import { parseForm } from '../platform/validation';
import { boundaryOutline } from '../../shared/registry/outline';
import type { Boundary } from '../../shared/registry/boundary';
import { boundaryDeclineSchema, type BoundaryProposal } from '../../shared/schemas/boundary-proposals';
import * as service from './boundary-proposals-service';
import { getField } from './service';
import { expectDefined } from '../platform/expect-defined';

/*
 * The field page's panel of boundaries traced on the phone (views/registry/_boundary_proposals.ejs):
 * each pending outline drawn over the field's current boundary, with Accept and Decline for clerks
 * and admins. The panel's data is set here before the field page renders, so the field page itself
 * only includes the partial.
 */

const SIZE = { width: 300, height: 220, margin: 10 };
const partsOf = (b: Boundary) => (b.type === 'Polygon' ? [b.coordinates] : b.coordinates);

/** The proposed outline and the current boundary in one frame, so that they can be compared. */
export function proposalDrawing(proposed: Boundary, current: Boundary | null) {
  const mine = partsOf(proposed);
  const theirs = current ? partsOf(current) : [];
  const outline = boundaryOutline({ type: 'MultiPolygon', coordinates: [...mine, ...theirs] }, SIZE);
  return { width: SIZE.width, height: SIZE.height, proposed: outline.paths.slice(0, mine.length), current: outline.paths.slice(mine.length) };
}

export function boundaryProposalPages(ctx: AppContext): Router {
  const router = Router();
  const { db } = ctx;
  const fieldPage = (req: Request) => `/registry/fields/${encodeURIComponent(String(req.params.id))}`;

  router.get('/registry/fields/:id', can('registry.read'), async (req: Request, res: Response, next: NextFunction) => {
    const me = contextOf(req);
    const field = await getField(db, me.organisationId, String(req.params.id));
    if (!field) return next(); // the field page answers 404
    const items: BoundaryProposal[] = await service.listProposals(db, me, field.id);
    const form = req.session?.declineForm ?? null;
    if (req.session?.declineForm) delete req.session.declineForm;
    res.locals.boundaryProposals = {
      pending: items
        .filter((p) => p.status === 'pending')
        .map((p) => ({ ...p, corners: partsOf(p.boundary).reduce((n, [outer]) => n + expectDefined(outer, 'a checked polygon’s outer ring').length - 1, 0), drawing: proposalDrawing(p.boundary, field.boundary) })),
      decided: items.filter((p) => p.status !== 'pending').slice(0, 5),
      hasBoundary: Boolean(field.boundary),
      canDecide: me.can('registry.write'),
      declineForm: form,
    };
    next();
  });

  router.post('/registry/fields/:id/boundary-proposals/:proposalId/accept', can('registry.write'), async (req, res) => {
    await decide(req, res, async () => {
      const p = await service.acceptProposal(db, contextOf(req), String(req.params.id), String(req.params.proposalId));
      return `Traced boundary accepted: it is now the field’s boundary (${p.proposedBy.name}, ${res.locals.fmt.date(p.proposedAt)}). The change is in the field’s history.`;
    });
  });

  router.post('/registry/fields/:id/boundary-proposals/:proposalId/decline', can('registry.write'), async (req, res) => {
    const parsed = parseForm(boundaryDeclineSchema, req.body);
    if (!parsed.ok) {
      req.session.declineForm = { proposalId: String(req.params.proposalId), reason: String(req.body?.reason ?? ''), error: parsed.errors.reason ?? 'Say why the traced boundary is declined.' };
      return res.redirect(303, `${fieldPage(req)}#boundary-proposals`);
    }
    await decide(req, res, async () => {
      await service.declineProposal(db, contextOf(req), String(req.params.id), String(req.params.proposalId), parsed.value.reason);
      return 'Traced boundary declined. The field is unchanged.';
    });
  });

  /** A decision that can no longer be made (decided by someone else, or invalid) is a message on the field page. */
  async function decide(req: Request, res: Response, run: () => Promise<string>) {
    try {
      req.session.flash = { kind: 'info', text: await run() };
    } catch (err) {
      if (!(err instanceof HttpError) || (err.code !== 'conflict' && err.code !== 'invalid')) throw err;
      req.session.flash = { kind: 'error', text: `${err.message} Nothing was changed.` };
    }
    res.redirect(303, `${fieldPage(req)}#boundary-proposals`);
  }

  return router;
}
