import { Router, type Request } from 'express';
import type { AppContext } from '../platform/app-context';
import { contextOf } from '../platform/context';
import { can } from '../platform/permissions';
import { parseForm } from '../platform/validation';
import { CROPS, DECISION_BASES } from '../../shared/calc/rules';
import { ftToM, mToFt } from '../../shared/calc/units';
import { DECISION_BASIS_NAMES, DECISION_BASIS_WORDS } from '../../shared/format';
import { kgPerHaToLbPerAc } from '../../shared/calc/units';
import { todayIso } from '../../shared/registry/season';
import { HttpError } from '../platform/errors';
import { creditRuleInputSchema } from '../../shared/schemas/rules';
import { currentCreditRule, listRuleVersions, saveRuleVersion } from './service';
import { numberOrText, rateToKgHa } from '../platform/form-values';

/** A typed percentage as a fraction (90 → 0.9), or the raw text so the schema reports it. */
function percentToFraction(v: unknown): number | string | null {
  const n = numberOrText(v);
  return typeof n === 'number' ? n / 100 : n;
}

/** The edge margin typed in the user's length unit (ft or m), in metres. */
function lengthToM(v: unknown, units: 'us' | 'metric'): number | string | null {
  const n = numberOrText(v);
  return typeof n === 'number' ? (units === 'us' ? ftToM(n) : n) : n;
}

/** The form's own words where the API's would name the wrong unit (the form asks for a percentage). */
const FORM_WORDS: Record<string, string> = {
  decisionBasis: 'Choose one of the three ways of deciding the verdict.',
  confidence: 'Enter the confidence as a percentage from 50 to 99.5, e.g. 90.',
  edgeMarginM: 'Enter the edge margin as a number from 0 to 100 m (0 to 328 ft).',
};

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
      decisionBasis: r.decisionBasis,
      confidence: String(Math.round(r.confidence * 1000) / 10),
      minPlants: String(r.minPlants),
      edgeMargin: String(Math.round((units === 'us' ? mToFt(r.edgeMarginM) : r.edgeMarginM) * 10) / 10),
      effectiveFrom: todayIso(),
      notes: '',
    });
    res.status(status).render('admin/rules', { title: 'Credit rule', current, versions, values: values ?? asForm(current), errors, crops: CROPS, kgPerHaToLbPerAc, bases: DECISION_BASES, basisWords: DECISION_BASIS_WORDS.en, basisNames: Object.fromEntries(Object.entries(DECISION_BASIS_NAMES.en).map(([k, v]) => [k, v[0]!.toUpperCase() + v.slice(1)])), mToFt });
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
      // The form asks for a percentage (90), the rule stores a fraction (0.9). A field not sent at
      // all keeps the version in effect's choice; one sent blank is an error beside it.
      decisionBasis: b.decisionBasis,
      confidence: b.confidence === undefined ? undefined : percentToFraction(b.confidence),
      minPlants: b.minPlants === undefined ? undefined : numberOrText(b.minPlants),
      edgeMarginM: b.edgeMargin === undefined ? undefined : lengthToM(b.edgeMargin, units),
      effectiveFrom: b.effectiveFrom || undefined,
      notes: b.notes || null,
    };
    const parsed = parseForm(creditRuleInputSchema, input);
    if (!parsed.ok) {
      const errors = Object.fromEntries(
        Object.entries(parsed.errors).map(([k, v]) => [
          ({ thresholdKgHa: 'threshold', creditKgNPerHa: 'credit', 'window.start': 'windowStart', 'window.end': 'windowEnd', edgeMarginM: 'edgeMargin' } as Record<string, string>)[k] ?? k,
          FORM_WORDS[k] ?? v,
        ]),
      );
      return show(req, 400, res, { ...b, eligibleCrops: crops }, errors);
    }
    let saved;
    try {
      saved = await saveRuleVersion(ctx.db, contextOf(req).organisationId, parsed.value, contextOf(req).user);
    } catch (err) {
      if (err instanceof HttpError && err.fields) return show(req, 400, res, { ...b, eligibleCrops: crops }, err.fields);
      throw err;
    }
    req.session.flash = { kind: 'info', text: `Rule version ${saved.version} saved, in effect from ${saved.effectiveFrom}.` };
    res.redirect('/admin/rules');
  });

  return router;
}
