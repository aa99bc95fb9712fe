import { Router, type Request, type Response } from 'express';
import { z } from 'zod';
import type { AppContext } from '../platform/app-context';
import { contextOf } from '../platform/context';
import { HttpError } from '../platform/errors';
import { can } from '../platform/permissions';
import { seasonLabel, todayIso } from '../../shared/registry/season';
import { isoDate } from '../../shared/schemas/dates';
import { assignWalk, assignWalks, assignmentsBySampler, plantingAssignments, unassignWalk } from './assignments-service';
import { expectDefined } from '../platform/expect-defined';

/*
 * Clerks ask samplers to walk plantings from the office: one at a time from the planting's own
 * page, several at once from the season view, and a per-sampler list of what each has, with due
 * dates, what is overdue and a way to take an assignment back. The rules are
 * server/walks/assignments-service.ts's.
 */

const isoDay = /^\d{4}-\d{2}-\d{2}$/;
const bulkSchema = z.object({
  plantingIds: z.union([z.string(), z.array(z.string())]).optional(),
  samplerId: z.string().optional(),
  dueOn: z.string().optional(),
  back: z.string().optional(),
});

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
    // All or nothing: one unknown planting or a refused sampler leaves every assignment as it was.
    await assignWalks(ctx.db, contextOf(req), ids, { samplerId: body.samplerId!, dueOn });
    const back = body.back && body.back.startsWith('/registry/season') ? body.back : '/registry/season';
    res.redirect(303, `${back}${back.includes('?') ? '&' : '?'}assigned=${ids.length}`);
  });

  // ---- one planting: its facts, who is asked to walk it, assign and take back ----
  const showPlanting = async (req: Request, res: Response, status = 200, values: Record<string, string> = {}, errors: Record<string, string> = {}) => {
    const view = await plantingAssignments(ctx.db, contextOf(req).organisationId, String(req.params.id));
    if (!view) throw new HttpError('not_found');
    const { planting, assignments, samplers, defaultDue, maxDays } = view;
    res.status(status).render('registry/planting', {
      title: `${planting.fieldName}, ${seasonLabel(planting.season)}`,
      planting,
      assignments,
      samplers,
      defaultDue,
      maxDays,
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
    if (due && !due.success) errors.dueOn = expectDefined(due.error.issues[0], 'the reason a date was refused').message;
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
    const today = todayIso();
    res.render('registry/assignments', { title: 'Assignments', samplers: await assignmentsBySampler(ctx.db, contextOf(req).organisationId, today), today });
  });

  return router;
}
