import { Router } from 'express';
import type { AppContext } from '../platform/app-context';
import { requireRole, requireSignIn } from '../platform/guards';
import { validateBody } from '../platform/validation';
import { todayIso } from '../../shared/registry/season';
import { creditRuleInputSchema, type CreditRuleInput } from '../../shared/schemas/rules';
import { insertRuleVersion, listRuleVersions } from './db';
import { currentCreditRule } from './service';

/**
 * /api/rules: GET /current is the organisation's credit rule in effect today, for every signed-in
 * role. PUT /current (admin) saves a NEW version of the rule; earlier versions stay as they
 * were, so registers of earlier years keep their rule. GET /api/rules/versions lists them.
 */
export function rulesApi(ctx: AppContext): Router {
  const router = Router();
  router.get('/current', requireSignIn, async (req, res) => {
    res.json(await currentCreditRule(ctx.db, req.user!.organisationId));
  });
  router.put('/current', requireRole('admin'), validateBody(creditRuleInputSchema), async (req, res) => {
    const { effectiveFrom, notes, ...rule } = req.body as CreditRuleInput;
    await insertRuleVersion(ctx.db, req.user!.organisationId, { ...rule, effectiveFrom: effectiveFrom ?? todayIso(), notes }, req.user!);
    res.json(await currentCreditRule(ctx.db, req.user!.organisationId));
  });
  router.get('/versions', requireRole('admin', 'clerk', 'auditor'), async (req, res) => {
    const items = await listRuleVersions(ctx.db, req.user!.organisationId);
    res.json({ items, total: items.length });
  });
  return router;
}
