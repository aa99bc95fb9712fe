import { Router } from 'express';
import type { AppContext } from '../../app';
import { requireRole } from '../../auth/guards';
import { validateBody } from '../../http/validate';
import { todayIso } from '../../../shared/registry/season';
import { creditRuleInputSchema, type CreditRuleInput } from '../../../shared/schemas/rules';
import { insertRuleVersion, listRuleVersions } from '../../db/credit-rules';
import { currentCreditRule } from '../../services/credit-rule';

/**
 * PUT /api/rules/current (admin) saves a NEW version of the rule; earlier versions stay as they
 * were, so registers of earlier years keep their rule. GET /api/rules/versions lists them.
 */
export function rulesAdminApi(ctx: AppContext): Router {
  const router = Router();
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
