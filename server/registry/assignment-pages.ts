import { Router } from 'express';
import type { Knex } from 'knex';
import { z } from 'zod';
import type { AppContext } from '../platform/app-context';
import { contextOf } from '../platform/context';
import { HttpError } from '../platform/errors';
import { can, rolesAllowed } from '../platform/permissions';
import { addDaysIso, todayIso } from '../../shared/registry/season';
import { currentCreditRule } from '../rules/public';
import { assignWalk, listActiveAssignees, listAssignmentsBySampler, plannedTerminationOf, type AssignmentRow } from '../walks/public';

/*
 * Clerks ask samplers to walk plantings from the office: several at once from the season view,
 * and a per-sampler list of what each has, with due dates and what is overdue. Each assignment
 * goes through the same service as PUT /api/plantings/:id/assignment.
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
