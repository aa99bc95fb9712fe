import type { Knex } from 'knex';
import { flag, isoDay } from '../platform/column-values';

/*
 * Reads behind the office's assignment pages: a planting's planned termination (for the default
 * due date), and the assignments of one planting or of the whole organisation by sampler.
 */

/** The planting's planned termination date (YYYY-MM-DD or null), or undefined when it is not the organisation's. */
export async function plannedTerminationOf(db: Knex, organisationId: string, plantingId: string): Promise<string | null | undefined> {
  const p = await db('plantings').where({ organisation_id: organisationId, id: plantingId }).first('planned_termination_on');
  return p ? isoDay(p.planned_termination_on) : undefined;
}

export interface AssignmentRow {
  samplerId: string;
  samplerName: string;
  plantingId: string;
  season: string;
  crop: string;
  terminatedOn: string | null;
  fieldId: string;
  fieldName: string;
  ranchName: string;
  dueOn: string | null;
  walked: boolean;
}

/** Every assignment of the organisation with its field, by sampler name then due date. */
export async function listAssignmentsBySampler(db: Knex, organisationId: string): Promise<AssignmentRow[]> {
  const rows = await db('walk_assignments')
    .join('users', 'users.id', 'walk_assignments.sampler_id')
    .join('plantings', 'plantings.id', 'walk_assignments.planting_id')
    .join('fields', 'fields.id', 'plantings.field_id')
    .join('ranches', 'ranches.id', 'fields.ranch_id')
    .where('walk_assignments.organisation_id', organisationId)
    .select(
      'users.id as samplerId',
      'users.name as samplerName',
      'plantings.id as plantingId',
      'plantings.season',
      'plantings.crop',
      'plantings.terminated_on as terminatedOn',
      'fields.id as fieldId',
      'fields.name as fieldName',
      'ranches.name as ranchName',
      'walk_assignments.due_on as dueOn',
      db.raw(`exists(select 1 from field_walks w where w.planting_id = plantings.id and w.status in ('submitted','approved')) as walked`),
    )
    .orderBy('users.name')
    .orderBy('walk_assignments.due_on')
    .orderBy('ranches.name')
    .orderBy('fields.name');
  return rows.map((r) => ({ ...r, dueOn: isoDay(r.dueOn), walked: flag(r.walked) }));
}

/** The assignments of one planting, with each sampler's name, by due date then name. */
export async function listAssignmentsOfPlanting(db: Knex, organisationId: string, plantingId: string): Promise<{ samplerId: string; samplerName: string; dueOn: string | null }[]> {
  const rows = await db('walk_assignments')
    .join('users', 'users.id', 'walk_assignments.sampler_id')
    .where({ 'walk_assignments.organisation_id': organisationId, 'walk_assignments.planting_id': plantingId })
    .orderBy('walk_assignments.due_on')
    .orderBy('users.name')
    .select('users.id as samplerId', 'users.name as samplerName', 'walk_assignments.due_on as dueOn');
  return rows.map((r) => ({ samplerId: r.samplerId, samplerName: r.samplerName, dueOn: isoDay(r.dueOn) }));
}
