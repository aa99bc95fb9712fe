import type { Knex } from 'knex';
import { shootNitrogen } from '../../shared/calc/nitrogen';
import { walkVerdictOf, type StoredEstimate } from '../../shared/format/walk';
import { HttpError } from '../platform/errors';
import { setWalkTissueN, tissueNLog, walkTissueN, type TissueNEntry } from './tissue-n-db';

/*
 * The lab's tissue N % of a walk (README, "Nitrogen in the shoots"): entered by the office on any
 * walk status, since it never changes the verdict; N in the shoots = biomass × N %, with the walk's
 * interval (the combined one when stored) carried through the same product.
 */

export interface TissueNView {
  walkId: string;
  percent: number | null;
  /** kg N/ha; null without a lab value or an estimate. */
  shootN: { kgNPerHa: number; interval: [number, number] | null } | null;
  log: TissueNEntry[];
}

export async function tissueNView(db: Knex, organisationId: string, walkId: string): Promise<TissueNView> {
  const row = await walkTissueN(db, organisationId, walkId);
  if (!row) throw new HttpError('not_found');
  let shootN: TissueNView['shootN'] = null;
  const e = row.estimate;
  if (e && row.percent != null) {
    const v = walkVerdictOf(e as StoredEstimate);
    const n = shootNitrogen(e.biomassKgHa, row.percent, v.combinedInterval ?? [e.interval[0], e.interval[1]]);
    shootN = { kgNPerHa: n.kgNPerHa, interval: n.interval };
  }
  return { walkId, percent: row.percent, shootN, log: await tissueNLog(db, organisationId, walkId) };
}

/** Sets (or clears, with null) the value; the caller checked 0 < percent ≤ 10 with the shared schema. */
export async function setTissueN(db: Knex, actor: { organisationId: string; user: { id: string }; name: string }, walkId: string, percent: number | null): Promise<TissueNView> {
  if (!(await walkTissueN(db, actor.organisationId, walkId))) throw new HttpError('not_found');
  await setWalkTissueN(db, actor.organisationId, walkId, percent, { id: actor.user.id, name: actor.name });
  return tissueNView(db, actor.organisationId, walkId);
}
