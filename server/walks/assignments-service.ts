import type { Knex } from 'knex';
import { HttpError } from '../platform/errors';
import { addDaysIso, todayIso } from '../../shared/registry/season';
import { getPlanting } from '../registry/public';
import { listAssignableSamplers } from '../people/public';
import { currentCreditRule } from '../rules/public';
import { assignWalk, type WalkActor } from './service';
import { listAssignmentsBySampler, listAssignmentsOfPlanting, plannedTerminationOf, type AssignmentRow } from './assignments-db';
import { inTransaction } from '../platform/database';

/*
 * Clerks ask samplers to walk plantings from the office: one at a time from the planting's own
 * page, several at once from the season view, and a per-sampler list of what each has. Each
 * assignment goes through `assignWalk` (server/walks/service.ts), as PUT /api/plantings/:id/assignment does.
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

/**
 * Asks one sampler to walk several plantings, each due by `dueOn` or, when it is null, by its own
 * default due date. All or nothing: one unknown planting or a refused sampler leaves every
 * assignment as it was.
 */
export async function assignWalks(db: Knex, actor: WalkActor, plantingIds: string[], input: { samplerId: string; dueOn: string | null }): Promise<void> {
  const rule = await currentCreditRule(db, actor.organisationId);
  const today = todayIso();
  await inTransaction(db, async (trx) => {
    for (const id of plantingIds) {
      const planned = await plannedTerminationOf(trx, actor.organisationId, id);
      if (planned === undefined) throw new HttpError('not_found', 'One of the selected plantings does not exist (it may have been deleted). Reload the season view.');
      const due = input.dueOn ?? defaultDueOn(planned, rule.maxDaysSampleBeforeTermination, today);
      await assignWalk(trx, actor, id, { samplerId: input.samplerId, dueOn: due });
    }
  });
}

/** A planting's own page: its facts, who is asked to walk it, the samplers to choose from and the default due date; undefined when it is not the organisation's. */
export async function plantingAssignments(db: Knex, organisationId: string, plantingId: string) {
  const planting = await getPlanting(db, organisationId, plantingId);
  if (!planting) return undefined;
  const [assignments, samplers, rule] = await Promise.all([listAssignmentsOfPlanting(db, organisationId, planting.id), listAssignableSamplers(db, organisationId), currentCreditRule(db, organisationId)]);
  const defaultDue = defaultDueOn(planting.plannedTerminationOn, rule.maxDaysSampleBeforeTermination, todayIso());
  return { planting, assignments, samplers, defaultDue, maxDays: rule.maxDaysSampleBeforeTermination };
}

export type SamplerAssignments = { name: string; items: (AssignmentRow & { overdue: boolean })[] };

/** Every assignment of the organisation grouped by sampler, each marked overdue when its due date has passed unwalked on a live planting. */
export async function assignmentsBySampler(db: Knex, organisationId: string, today: string): Promise<SamplerAssignments[]> {
  const rows = await listAssignmentsBySampler(db, organisationId);
  const bySampler = new Map<string, SamplerAssignments>();
  for (const r of rows) {
    const overdue = !r.walked && !r.terminatedOn && r.dueOn !== null && r.dueOn < today;
    if (!bySampler.has(r.samplerId)) bySampler.set(r.samplerId, { name: r.samplerName, items: [] });
    bySampler.get(r.samplerId)!.items.push({ ...r, overdue });
  }
  return [...bySampler.values()];
}

export { assignWalk, unassignWalk } from './service';
