import { Router } from 'express';
import type { AppContext } from '../app';
import { requireSignIn } from '../platform/guards';
import { currentCreditRule } from './service';

/** GET /api/rules/current: the organisation's credit rule in effect today, for every signed-in role. */
export function rulesApi(ctx: AppContext): Router {
  const router = Router();
  router.get('/current', requireSignIn, async (req, res) => {
    res.json(await currentCreditRule(ctx.db, req.user!.organisationId));
  });
  return router;
}
