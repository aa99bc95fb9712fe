import { Router, type Request, type Response } from 'express';
import type { Knex } from 'knex';
import { z } from 'zod';
import type { AppContext } from '../platform/app-context';
import { contextOf } from '../platform/context';
import { HttpError } from '../platform/errors';
import { can, rolesAllowed } from '../platform/permissions';
import { addDaysIso, todayIso } from '../../shared/registry/season';
import { currentCreditRule } from '../rules/public';
import { assignWalk, listActiveAssignees, listAssignmentsBySampler, listAssignmentsOfPlanting, plannedTerminationOf, unassignWalk, type AssignmentRow } from './public';
import { isoDate } from '../../shared/schemas/dates';
import { seasonLabel } from '../../shared/registry/season';
import { getPlanting } from '../registry/public';

/*
 * Clerks ask samplers to walk plantings from the office: one at a time from the planting's own
 * page, several at once from the season view, and a per-sampler list of what each has, with due
 * dates, what is overdue and a way to take an assignment back. Each assignment goes through the
 * same service as PUT /api/plantings/:id/assignment.
 */

/**
 * The default due-by date: the rule's latest walk date before planned termination (planned
 * termination minus the rule's maximum days between walk and termination), never before today.
 */
export function defaultDueOn(plannedTerminationOn: string | null, maxDaysBeforeTermination: number, today: string): string | null {
  if (!plannedTerminationOn) return null;
  const latest = addDaysIso(plannedTerminationOn, -maxDaysBeforeTermination);
  return latest < today ? today : latest;
}

const isoDay = /^\d{4}-\d{2}-\d{2}$/;
const bulkSchema = z.object({
  plantingIds: z.union([z.string(), z.array(z.string())]).optional(),
  samplerId: z.string().optional(),
  dueOn: z.string().optional(),
  back: z.string().optional(),
});

export function samplerOptions(db: Knex, organisationId: string) {
  return listActiveAssignees(db, organisationId, rolesAllowed('walks.assignee'));
}

export function assignmentPages(ctx: AppContext): Router {
  const router = Router();

  router.post('/registry/season/assign', can('walks.assign'), async (req, res) => {
    const body = bulkSchema.parse(req.body ?? {});
    const ids = [...new Set([body.plantingIds ?? []].flat().filter(Boolean))];
    const fields: Record<string, string> = {};
    if (!ids.length) fields.plantingIds = 'Select at least one planting to assign.';
    if (ids.length > 500) fields.plantingIds = 'Assign at most 500 plantings at a time.';
    if (!body.samplerId) fields.samplerId = 'Choose a sampler.';
    const dueOn = body.dueOn?.trim() || null;
    if (dueOn && (!isoDay.test(dueOn) || Number.isNaN(Date.parse(dueOn)))) fields.dueOn = 'Enter the due date as a date, for example 2027-03-15, or leave it empty for the rule’s latest walk date.';
    if (Object.keys(fields).length) throw new HttpError('invalid', Object.values(fields).join(' '), fields);
    const orgId = contextOf(req).organisationId;
    const today = todayIso();
    const rule = await currentCreditRule(ctx.db, orgId);
    const actor = contextOf(req);
    // All or nothing: one unknown planting or a refused sampler leaves every assignment as it was.
    await ctx.db.transaction(async (trx) => {
      for (const id of ids) {
        const planned = await plannedTerminationOf(trx, orgId, id);
        if (planned === undefined) throw new HttpError('not_found', 'One of the selected plantings does not exist (it may have been deleted). Reload the season view.');
        const due = dueOn ?? defaultDueOn(planned, rule.maxDaysSampleBeforeTermination, today);
        await assignWalk(trx, actor, id, { samplerId: body.samplerId!, dueOn: due });
      }
    });
    const back = body.back && body.back.startsWith('/registry/season') ? body.back : '/registry/season';
    res.redirect(303, `${back}${back.includes('?') ? '&' : '?'}assigned=${ids.length}`);
  });

  // ---- one planting: its facts, who is asked to walk it, assign and take back ----
  const showPlanting = async (req: Request, res: Response, status = 200, values: Record<string, string> = {}, errors: Record<string, string> = {}) => {
    const orgId = contextOf(req).organisationId;
    const planting = await getPlanting(ctx.db, orgId, String(req.params.id));
    if (!planting) throw new HttpError('not_found');
    const [assignments, samplers, rule] = await Promise.all([listAssignmentsOfPlanting(ctx.db, orgId, planting.id), samplerOptions(ctx.db, orgId), currentCreditRule(ctx.db, orgId)]);
    const defaultDue = defaultDueOn(planting.plannedTerminationOn, rule.maxDaysSampleBeforeTermination, todayIso());
    res.status(status).render('registry/planting', {
      title: `${planting.fieldName}, ${seasonLabel(planting.season)}`,
      planting,
      assignments,
      samplers,
      defaultDue,
      maxDays: rule.maxDaysSampleBeforeTermination,
      values: { samplerId: '', dueOn: defaultDue ?? '', ...values },
      errors,
      seasonLabel,
      canAssign: contextOf(req).can('walks.assign'),
    });
  };

  router.get('/registry/plantings/:id', can('registry.read'), async (req, res, next) => {
    if (req.params.id === 'new') return next(); // the new-planting form
    await showPlanting(req, res);
  });

  router.post('/registry/plantings/:id/assign', can('walks.assign'), async (req, res) => {
    const body = bulkSchema.parse(req.body ?? {});
    const values = { samplerId: body.samplerId ?? '', dueOn: body.dueOn?.trim() ?? '' };
    const errors: Record<string, string> = {};
    if (!values.samplerId) errors.samplerId = 'Choose the sampler who should walk this planting.';
    const due = values.dueOn ? isoDate.safeParse(values.dueOn) : null;
    if (due && !due.success) errors.dueOn = due.error.issues[0].message;
    if (Object.keys(errors).length) return showPlanting(req, res, 400, values, errors);
    try {
      await assignWalk(ctx.db, contextOf(req), String(req.params.id), { samplerId: values.samplerId, dueOn: values.dueOn || null });
    } catch (err) {
      if (err instanceof HttpError && err.fields) return showPlanting(req, res, 400, values, err.fields);
      throw err;
    }
    req.session.flash = { kind: 'info', text: 'Assigned. The sampler sees it under “Assigned to you” on the phone.' };
    res.redirect(303, `/registry/plantings/${String(req.params.id)}`);
  });

  router.post('/registry/plantings/:id/unassign', can('walks.assign'), async (req, res) => {
    const samplerId = typeof req.body?.samplerId === 'string' ? req.body.samplerId : '';
    await unassignWalk(ctx.db, contextOf(req), String(req.params.id), samplerId);
    req.session.flash = { kind: 'info', text: 'Assignment removed. The planting stays on every sampler’s list of open plantings.' };
    const back = req.body?.back === '/registry/assignments' ? '/registry/assignments' : `/registry/plantings/${String(req.params.id)}`;
    res.redirect(303, back);
  });

  router.get('/registry/assignments', can('office.use'), async (req, res) => {
    const orgId = contextOf(req).organisationId;
    const today = todayIso();
    const rows = await listAssignmentsBySampler(ctx.db, orgId);
    const bySampler = new Map<string, { name: string; items: (AssignmentRow & { overdue: boolean })[] }>();
    for (const r of rows) {
      const overdue = !r.walked && !r.terminatedOn && r.dueOn !== null && r.dueOn < today;
      if (!bySampler.has(r.samplerId)) bySampler.set(r.samplerId, { name: r.samplerName, items: [] });
      bySampler.get(r.samplerId)!.items.push({ ...r, overdue });
    }
    res.render('registry/assignments', { title: 'Assignments', samplers: [...bySampler.values()], today });
  });

  return router;
}
