import type { Knex } from 'knex';
import { rolesAllowed } from '../platform/permissions';

/*
 * The daily jobs' queries. They run across organisations (one job for the whole install); callers
 * match rows on organisation_id so that nobody is told about another organisation's plantings.
 */

/**
 * Claims today's run of a job: true for the one caller whose insert succeeds. Several app servers
 * on one database therefore send each day's reminders once.
 */
export async function claimDailyRun(db: Knex, job: string, day: string): Promise<boolean> {
  try {
    await db('job_runs').insert({ job, run_on: day, started_at: new Date().toISOString() });
    return true;
  } catch {
    return false; // already claimed today (primary key)
  }
}

export async function finishRun(db: Knex, job: string, day: string, summary: unknown) {
  await db('job_runs').where({ job, run_on: day }).update({ finished_at: new Date().toISOString(), summary: JSON.stringify(summary) });
}

export interface EndingPlanting {
  id: string;
  organisation_id: string;
  crop: string;
  planned_termination_on: string;
  field_name: string;
  ranch_name: string;
}

/** Plantings not yet terminated whose planned termination falls between the two dates, with no approved walk. */
export async function plantingsEndingWithoutApprovedWalk(db: Knex, from: string, until: string): Promise<EndingPlanting[]> {
  return db('plantings')
    .join('fields', 'fields.id', 'plantings.field_id')
    .join('ranches', 'ranches.id', 'fields.ranch_id')
    .whereNull('plantings.terminated_on')
    .whereNotNull('plantings.planned_termination_on')
    .whereBetween('plantings.planned_termination_on', [from, until])
    .whereNotExists(db('field_walks').whereRaw('field_walks.planting_id = plantings.id').where('field_walks.status', 'approved'))
    .select('plantings.id', 'plantings.organisation_id', 'plantings.crop', 'plantings.planned_termination_on', 'fields.name as field_name', 'ranches.name as ranch_name')
    .orderBy('plantings.planned_termination_on')
    .orderBy('ranches.name')
    .orderBy('fields.name');
}

/** Active users who may be asked to walk plantings and can sign in. */
export async function activeAssignees(db: Knex): Promise<{ id: string; organisation_id: string; name: string; email: string }[]> {
  return db('users').whereIn('role', rolesAllowed('walks.assignee')).where({ active: true }).whereNotNull('password_hash').select('id', 'organisation_id', 'name', 'email');
}

/** Every walk assignment: which sampler was asked to walk which planting. */
export async function allWalkAssignments(db: Knex): Promise<{ planting_id: string; sampler_id: string }[]> {
  return db('walk_assignments').select('planting_id', 'sampler_id');
}

export interface AssignedPlanting {
  sampler_id: string;
  due_on: string | null;
  id: string;
  organisation_id: string;
  crop: string;
  planned_termination_on: string | null;
  field_name: string;
  ranch_name: string;
}

/**
 * Assigned plantings to remind their sampler of: not terminated, no approved walk, and due by
 * `until` (overdue ones included), or, with no due date, planned for termination between the two dates.
 */
export async function assignedPlantingsDue(db: Knex, from: string, until: string): Promise<AssignedPlanting[]> {
  return db('walk_assignments')
    .join('plantings', 'plantings.id', 'walk_assignments.planting_id')
    .join('fields', 'fields.id', 'plantings.field_id')
    .join('ranches', 'ranches.id', 'fields.ranch_id')
    .whereRaw('walk_assignments.organisation_id = plantings.organisation_id')
    .whereNull('plantings.terminated_on')
    .where((q) =>
      q
        .where((d) => d.whereNotNull('walk_assignments.due_on').where('walk_assignments.due_on', '<=', until))
        .orWhere((d) => d.whereNull('walk_assignments.due_on').whereBetween('plantings.planned_termination_on', [from, until])),
    )
    .whereNotExists(db('field_walks').whereRaw('field_walks.planting_id = plantings.id').where('field_walks.status', 'approved'))
    .select(
      'walk_assignments.sampler_id',
      'walk_assignments.due_on',
      'plantings.id',
      'plantings.organisation_id',
      'plantings.crop',
      'plantings.planned_termination_on',
      'fields.name as field_name',
      'ranches.name as ranch_name',
    )
    .orderBy('ranches.name')
    .orderBy('fields.name');
}
