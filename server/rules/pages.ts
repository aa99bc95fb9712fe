import { Router, type Request } from 'express';
import type { AppContext } from '../platform/app-context';
import { contextOf } from '../platform/context';
import { can } from '../platform/permissions';
import { parseForm } from '../platform/validation';
import { CROPS } from '../../shared/calc/rules';
import { kgPerHaToLbPerAc } from '../../shared/calc/units';
import { todayIso } from '../../shared/registry/season';
import { creditRuleInputSchema } from '../../shared/schemas/rules';
import { insertRuleVersion, listRuleVersions } from './service';
import { currentCreditRule } from './service';
import { numberOrText, rateToKgHa } from '../platform/form-values';

/** Admin: the organisation's credit rule, versioned with an effective date. */
export function rulesPages(ctx: AppContext): Router {
  const router = Router();
  router.use('/admin/rules', can('rules.manage'));

  const show = async (req: Request, status: number, res: import('express').Response, values?: Record<string, unknown>, errors: Record<string, string> = {}) => {
    const orgId = contextOf(req).organisationId;
    const current = await currentCreditRule(ctx.db, orgId);
    const versions = await listRuleVersions(ctx.db, orgId);
    const units = contextOf(req).units;
    const asForm = (r: typeof current) => ({
      threshold: units === 'us' ? String(Math.round(kgPerHaToLbPerAc(r.thresholdKgHa))) : String(Math.round(r.thresholdKgHa)),
      minDaysInWindow: String(r.minDaysInWindow),
      windowStart: r.window.start,
      windowEnd: r.window.end,
      eligibleCrops: r.eligibleCrops,
      credit: units === 'us' ? String(Math.round(kgPerHaToLbPerAc(r.creditKgNPerHa) * 10) / 10) : String(Math.round(r.creditKgNPerHa * 10) / 10),
      maxDaysSampleBeforeTermination: String(r.maxDaysSampleBeforeTermination),
      effectiveFrom: todayIso(),
      notes: '',
    });
    res.status(status).render('admin/rules', { title: 'Credit rule', current, versions, values: values ?? asForm(current), errors, crops: CROPS, kgPerHaToLbPerAc });
  };

  router.get('/admin/rules', (req, res) => show(req, 200, res));

  router.post('/admin/rules', async (req, res) => {
    const b = req.body ?? {};
    const units = contextOf(req).units;
    const crops = Array.isArray(b.eligibleCrops) ? b.eligibleCrops : b.eligibleCrops ? [b.eligibleCrops] : [];
    const input = {
      thresholdKgHa: rateToKgHa(b.threshold, units),
      minDaysInWindow: numberOrText(b.minDaysInWindow),
      window: { start: b.windowStart, end: b.windowEnd },
      eligibleCrops: crops,
      creditKgNPerHa: rateToKgHa(b.credit, units),
      maxDaysSampleBeforeTermination: numberOrText(b.maxDaysSampleBeforeTermination),
      effectiveFrom: b.effectiveFrom || undefined,
      notes: b.notes || null,
    };
    const parsed = parseForm(creditRuleInputSchema, input);
    if (!parsed.ok) {
      const errors = Object.fromEntries(
        Object.entries(parsed.errors).map(([k, v]) => [
          ({ thresholdKgHa: 'threshold', creditKgNPerHa: 'credit', 'window.start': 'windowStart', 'window.end': 'windowEnd' } as Record<string, string>)[k] ?? k,
          v,
        ]),
      );
      return show(req, 400, res, { ...b, eligibleCrops: crops }, errors);
    }
    const { effectiveFrom, notes, ...rule } = parsed.value;
    const saved = await insertRuleVersion(ctx.db, contextOf(req).organisationId, { ...rule, effectiveFrom: effectiveFrom ?? todayIso(), notes }, contextOf(req).user);
    req.session.flash = { kind: 'info', text: `Rule version ${saved.version} saved, in effect from ${saved.effectiveFrom}.` };
    res.redirect('/admin/rules');
  });

  return router;
}
