import type { Knex } from 'knex';
import type { WalkEstimate } from '../../shared/schemas/walks';
import { inOrganisation, nowIso } from '../platform/scope';
import { jsonValue } from '../platform/column-values';

/** One entry of a walk's tissue-N log: who set (or cleared, percent null) the lab value, and when. */
export interface TissueNEntry {
  percent: number | null;
  previousPercent: number | null;
  setByName: string;
  setAt: string;
}

export interface WalkTissueN {
  walkId: string;
  /** The estimate snapshot, for N in the shoots. */
  estimate: WalkEstimate | null;
  percent: number | null;
}

/** The walk's current tissue N % and its estimate snapshot; undefined when not the organisation's. */
export async function walkTissueN(db: Knex, organisationId: string, walkId: string): Promise<WalkTissueN | undefined> {
  const row = await inOrganisation(db, 'field_walks', organisationId).where('id', walkId).first('id', 'estimate', 'tissue_n_percent');
  return row && { walkId: row.id, estimate: jsonValue<WalkEstimate>(row.estimate), percent: row.tissue_n_percent == null ? null : Number(row.tissue_n_percent) };
}

/** The log, newest first. */
export async function tissueNLog(db: Knex, organisationId: string, walkId: string): Promise<TissueNEntry[]> {
  const rows = await inOrganisation(db, 'walk_tissue_n_log', organisationId).where('walk_id', walkId).orderBy('seq', 'desc');
  return rows.map((r: Record<string, unknown>) => ({
    percent: r.percent == null ? null : Number(r.percent),
    previousPercent: r.previous_percent == null ? null : Number(r.previous_percent),
    setByName: String(r.set_by_name),
    setAt: String(r.set_at),
  }));
}

/** Sets the value and appends to the log in one transaction; the walk's status, estimate and verdict are untouched. */
export async function setWalkTissueN(db: Knex, organisationId: string, walkId: string, percent: number | null, actor: { id: string; name: string }): Promise<void> {
  await db.transaction(async (trx) => {
    const current = await walkTissueN(trx, organisationId, walkId);
    if (!current) return;
    await inOrganisation(trx, 'field_walks', organisationId).where('id', walkId).update({ tissue_n_percent: percent });
    await trx('walk_tissue_n_log').insert({
      organisation_id: organisationId,
      walk_id: walkId,
      percent,
      previous_percent: current.percent,
      set_by: actor.id,
      set_by_name: actor.name,
      set_at: nowIso(),
    });
  });
}
