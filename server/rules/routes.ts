import { Router } from 'express';
import type { AppContext } from '../platform/app-context';
import { contextOf } from '../platform/context';
import { can } from '../platform/permissions';
import { validateBody } from '../platform/validation';
import { creditRuleInputSchema, type CreditRuleInput } from '../../shared/schemas/rules';
import { listRuleVersions, saveRuleVersion } from './service';
import { currentCreditRule } from './service';

/**
 * /api/rules: GET /current is the organisation's credit rule in effect today, for every signed-in
 * role. PUT /current (admin) saves a NEW version of the rule; earlier versions stay as they
 * were, so registers of earlier years keep their rule. GET /api/rules/versions lists them.
 */
export function rulesApi(ctx: AppContext): Router {
  const router = Router();
  router.get('/current', can('rules.read'), async (req, res) => {
    res.json(await currentCreditRule(ctx.db, contextOf(req).organisationId));
  });
  router.put('/current', can('rules.manage'), validateBody(creditRuleInputSchema), async (req, res) => {
    await saveRuleVersion(ctx.db, contextOf(req).organisationId, req.body as CreditRuleInput, contextOf(req).user);
    res.json(await currentCreditRule(ctx.db, contextOf(req).organisationId));
  });
  router.get('/versions', can('rules.history'), async (req, res) => {
    const items = await listRuleVersions(ctx.db, contextOf(req).organisationId);
    res.json({ items, total: items.length });
  });
  return router;
}
