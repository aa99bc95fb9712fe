import type { Knex } from 'knex';
import type { WalkEstimate, WalkStatus } from '../../shared/schemas/walks';
import { inOrganisation } from '../platform/scope';

/*
 * What a credit register reads: each field of the chosen ranches with its planting of the season
 * (if any), and the approved field walks of those plantings. Read-only; every query starts from
 * inOrganisation, so another organisation's rows are never reached.
 */

export interface FieldWithPlanting {
  ranchId: string;
  ranchName: string;
  fieldId: string;
  fieldName: string;
  areaHa: number;
  plantingId: string | null;
  crop: string | null;
  variety: string | null;
  seededOn: string | null;
  plannedTerminationOn: string | null;
  terminatedOn: string | null;
}

export interface ApprovedWalkInput {
  id: string;
  plantingId: string;
  walkedOn: string;
  /** The estimate snapshot stored with the walk; null when no calibration was assigned. */
  estimate: WalkEstimate | null;
  /** The lab's tissue N % the office entered for the walk, if any (information, never the verdict). */
  tissueNPercent?: number | null;
  /** Set when an admin let the walker review this walk themselves. */
  ownReviewWaiver?: { byName: string; reason: string };
}

/** Every field of the organisation (or of the given ranches) with its planting of `season`; used by registers and the season view. */
export async function fieldsWithPlanting(db: Knex, organisationId: string, opts: { season: string; ranchIds?: string[] }): Promise<FieldWithPlanting[]> {
  const q = inOrganisation(db, 'fields', organisationId)
    .join('ranches', 'ranches.id', 'fields.ranch_id')
    .leftJoin('plantings', (j) => j.on('plantings.field_id', 'fields.id').andOn('plantings.season', db.raw('?', [opts.season])))
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
      'plantings.planned_termination_on',
      'plantings.terminated_on',
    )
    .orderBy('ranches.name')
    .orderBy('fields.name')
    .orderBy('fields.id');
  if (opts.ranchIds) q.whereIn('fields.ranch_id', opts.ranchIds);
  const rows: Record<string, string | number | null>[] = await q;
  return rows.map((r) => ({
    ranchId: r.ranch_id as string,
    ranchName: r.ranch_name as string,
    fieldId: r.field_id as string,
    fieldName: r.field_name as string,
    areaHa: Number(r.area_ha),
    plantingId: (r.planting_id as string) ?? null,
    crop: (r.crop as string) ?? null,
    variety: (r.variety as string) ?? null,
    seededOn: (r.seeded_on as string) ?? null,
    plannedTerminationOn: (r.planned_termination_on as string) ?? null,
    terminatedOn: (r.terminated_on as string) ?? null,
  }));
}

// SQLite allows at most 32,766 bound values (999 before 3.32); 500 ids per query stays far below.
const ID_CHUNK = 500;

/** The approved field walks of the given plantings, oldest first (by walk date, then review time). Only approved walks count. */
export async function approvedWalksFor(db: Knex, organisationId: string, plantingIds: string[]): Promise<ApprovedWalkInput[]> {
  const out: ApprovedWalkInput[] = [];
  for (let i = 0; i < plantingIds.length; i += ID_CHUNK) {
    const rows: Record<string, string | number | null>[] = await inOrganisation(db, 'field_walks', organisationId)
      .where('field_walks.status', 'approved')
      .whereIn('field_walks.planting_id', plantingIds.slice(i, i + ID_CHUNK))
      .leftJoin('users as waiver', 'waiver.id', 'field_walks.own_review_waived_by')
      .select('field_walks.id', 'field_walks.planting_id', 'field_walks.walked_on', 'field_walks.estimate', 'field_walks.tissue_n_percent', 'field_walks.own_review_waiver_reason', 'waiver.name as waiver_name')
      .orderBy('field_walks.planting_id')
      .orderBy('field_walks.walked_on')
      .orderBy('field_walks.reviewed_at')
      .orderBy('field_walks.id');
    for (const r of rows) {
      out.push({
        id: r.id as string,
        plantingId: r.planting_id as string,
        walkedOn: String(r.walked_on).slice(0, 10),
        estimate: r.estimate ? (JSON.parse(String(r.estimate)) as WalkEstimate) : null,
        tissueNPercent: r.tissue_n_percent == null ? null : Number(r.tissue_n_percent),
        ...(r.own_review_waiver_reason ? { ownReviewWaiver: { byName: String(r.waiver_name ?? ''), reason: String(r.own_review_waiver_reason) } } : {}),
      });
    }
  }
  return out;
}

export interface RegisterRanchInput {
  id: string;
  name: string;
  code: string | null;
  county: string | null;
  contactEmails: string[];
}

/** The organisation's ranches (or the given ones), by name. */
export async function registerRanches(db: Knex, organisationId: string, ranchIds?: string[]): Promise<RegisterRanchInput[]> {
  const q = inOrganisation(db, 'ranches', organisationId).select('id', 'name', 'code', 'county', 'contact_emails').orderBy('name');
  if (ranchIds) q.whereIn('id', ranchIds);
  const rows: Record<string, string | null>[] = await q;
  return rows.map((r) => ({
    id: r.id as string,
    name: r.name as string,
    code: r.code ?? null,
    county: r.county ?? null,
    contactEmails: r.contact_emails ? r.contact_emails.split(',').map((s) => s.trim()).filter(Boolean) : [],
  }));
}

/** The status of each planting's latest walk (by walk date, then creation), for the season view. */
export async function latestWalkStatuses(db: Knex, organisationId: string, plantingIds: string[]): Promise<Map<string, WalkStatus>> {
  const out = new Map<string, WalkStatus>();
  for (let i = 0; i < plantingIds.length; i += ID_CHUNK) {
    const rows: { planting_id: string; status: WalkStatus }[] = await inOrganisation(db, 'field_walks', organisationId)
      .whereIn('planting_id', plantingIds.slice(i, i + ID_CHUNK))
      .orderBy('walked_on', 'asc')
      .orderBy('created_at', 'asc')
      .select('planting_id', 'status');
    for (const r of rows) out.set(r.planting_id, r.status); // ascending: the last one written wins
  }
  return out;
}

/** How many fields the organisation has (a register job's progress counts them). */
export async function countFields(db: Knex, organisationId: string): Promise<number> {
  const row = await inOrganisation(db, 'fields', organisationId).count({ n: '*' }).first();
  return Number(row?.n ?? 0);
}
