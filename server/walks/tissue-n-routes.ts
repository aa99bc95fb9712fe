import { Router } from 'express';
import type { AppContext } from '../platform/app-context';
import { contextOf } from '../platform/context';
import { can } from '../platform/permissions';
import { validateBody } from '../platform/validation';
import { tissueNSchema, type TissueNInput } from '../../shared/schemas/walks';
import { setTissueN, tissueNView } from './tissue-n-service';

/** GET and PUT /api/walks/:id/tissue-n: the lab's tissue N % and N in the shoots (README, API). */
export function tissueNApi(ctx: AppContext): Router {
  const router = Router();
  router.get('/:id/tissue-n', can('walks.readAll'), async (req, res) => {
    res.json(await tissueNView(ctx.db, contextOf(req).organisationId, String(req.params.id)));
  });
  router.put('/:id/tissue-n', can('walks.tissueN'), validateBody(tissueNSchema), async (req, res) => {
    res.json(await setTissueN(ctx.db, contextOf(req), String(req.params.id), (req.body as TissueNInput).percent));
  });
  return router;
}
