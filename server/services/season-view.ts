import type { Knex } from 'knex';
import { daysBetween, daysInWindow } from '../../shared/calc/dates';
import type { CreditRule } from '../../shared/calc/rules';
import type { WalkStatus } from '../../shared/schemas/walks';
import { inOrganisation } from '../db/scope';

export interface SeasonRow {
  ranchId: string;
  ranchName: string;
  fieldId: string;
  fieldName: string;
  areaHa: number;
  plantingId: string | null;
  crop: string | null;
  variety: string | null;
  seededOn: string | null;
  terminatedOn: string | null;
  plannedTerminationOn: string | null;
  /** Days from seeding to termination, or to today while the crop still grows. */
  daysSinceSeeding: number | null;
  /** Days of that growth inside the rule's rainy window (so far, while it grows). */
  daysInWindow: number | null;
  /** Status of the planting's latest field walk (by walk date), or "none". */
  walkStatus: 'none' | WalkStatus;
}

/**
 * One row per field of the organisation for a season: its planting (if any) and how far it has
 * got inside the rainy window. Filters by ranch and crop; fields with no planting show when no
 * crop filter is set (a bare fallow is part of the picture).
 */
export async function seasonRows(
  db: Knex,
  organisationId: string,
  opts: { season: string; ranchId?: string; crop?: string; today: string; rule: Pick<CreditRule, 'window'> },
): Promise<SeasonRow[]> {
  const q = inOrganisation(db, 'fields', organisationId)
    .join('ranches', 'ranches.id', 'fields.ranch_id')
    .leftJoin('plantings', (j) => j.on('plantings.field_id', 'fields.id').andOn('plantings.season', db.raw('?', [opts.season])))
    .leftJoin('field_walks as latest_walk', (j) =>
      j.on(
        'latest_walk.id',
        '=',
        db.raw('(select w.id from field_walks w where w.planting_id = plantings.id order by w.walked_on desc, w.created_at desc limit 1)'),
      ),
    )
    .select(
      'ranches.id as ranch_id',
      'ranches.name as ranch_name',
      'fields.id as field_id',
      'fields.name as field_name',
      'fields.area_ha',
      'plantings.id as planting_id',
      'plantings.crop',
      'plantings.variety',
      'plantings.seeded_on',
      'plantings.terminated_on',
      'plantings.planned_termination_on',
      'latest_walk.status as walk_status',
    )
    .orderBy('ranches.name')
    .orderBy('fields.name');
  if (opts.ranchId) q.where('fields.ranch_id', opts.ranchId);
  if (opts.crop) q.where('plantings.crop', opts.crop);
  const rows: Record<string, string | number | null>[] = await q;
  return rows.map((r) => {
    const seeded = r.seeded_on as string | null;
    let end = (r.terminated_on as string | null) ?? opts.today;
    if (seeded && end < seeded) end = seeded; // seeded in the future: nothing has grown yet
    return {
      ranchId: r.ranch_id as string,
      ranchName: r.ranch_name as string,
      fieldId: r.field_id as string,
      fieldName: r.field_name as string,
      areaHa: Number(r.area_ha),
      plantingId: (r.planting_id as string) ?? null,
      crop: (r.crop as string) ?? null,
      variety: (r.variety as string) ?? null,
      seededOn: seeded,
      terminatedOn: (r.terminated_on as string) ?? null,
      plannedTerminationOn: (r.planned_termination_on as string) ?? null,
      daysSinceSeeding: seeded ? daysBetween(seeded, end) : null,
      daysInWindow: seeded ? daysInWindow(seeded, end, opts.rule.window) : null,
      walkStatus: (r.walk_status as WalkStatus | null) ?? 'none',
    };
  });
}
