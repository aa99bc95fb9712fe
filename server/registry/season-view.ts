import type { Knex } from 'knex';
import { daysBetween, daysInWindow } from '../../shared/calc/dates';
import type { CreditRule } from '../../shared/calc/rules';
import type { WalkStatus } from '../../shared/schemas/walks';
import { fieldsWithPlanting, latestWalkStatuses, type FieldWithPlanting } from '../registers/public';

export interface SeasonRow extends FieldWithPlanting {
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
  const fields = await fieldsWithPlanting(db, organisationId, { season: opts.season, ranchIds: opts.ranchId ? [opts.ranchId] : undefined });
  const rows = opts.crop ? fields.filter((f) => f.crop === opts.crop) : fields;
  const walkStatus = await latestWalkStatuses(db, organisationId, rows.flatMap((r) => (r.plantingId ? [r.plantingId] : [])));
  return rows.map((r) => {
    const seeded = r.seededOn;
    let end = r.terminatedOn ?? opts.today;
    if (seeded && end < seeded) end = seeded; // seeded in the future: nothing has grown yet
    return {
      ...r,
      daysSinceSeeding: seeded ? daysBetween(seeded, end) : null,
      daysInWindow: seeded ? daysInWindow(seeded, end, opts.rule.window) : null,
      walkStatus: (r.plantingId && walkStatus.get(r.plantingId)) || 'none',
    };
  });
}
