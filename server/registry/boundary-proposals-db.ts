import type { Knex } from 'knex';
import type { Boundary } from '../../shared/registry/boundary';
import type { BoundaryProposal } from '../../shared/schemas/boundary-proposals';
import { inOrganisation } from '../platform/scope';
import { isoTime, jsonValue } from '../platform/column-values';

/* Boundaries traced on the phone, waiting for the office (migrations/20261202062741_field_boundary_proposals.ts). */

export interface ProposalRecord extends BoundaryProposal {
  contentHash: string;
}

const toProposal = (r: Record<string, unknown>): ProposalRecord => ({
  id: r.id as string,
  fieldId: r.field_id as string,
  boundary: jsonValue<Boundary>(r.boundary)!,
  areaHa: Number(r.area_ha),
  pointsRecorded: Number(r.points_recorded),
  medianAccuracyM: r.median_accuracy_m == null ? null : Number(r.median_accuracy_m),
  status: r.status as BoundaryProposal['status'],
  proposedBy: { id: (r.proposed_by as string) ?? null, name: r.proposed_by_name as string },
  proposedAt: isoTime(r.proposed_at)!,
  decidedBy: r.decided_by_name ? { id: (r.decided_by as string) ?? null, name: r.decided_by_name as string } : null,
  decidedAt: isoTime(r.decided_at),
  declineReason: (r.decline_reason as string) ?? null,
  contentHash: r.content_hash as string,
});

export async function getProposal(db: Knex, organisationId: string, id: string): Promise<ProposalRecord | undefined> {
  const r = await inOrganisation(db, 'field_boundary_proposals', organisationId).where('id', id).first();
  return r ? toProposal(r) : undefined;
}

/** A field's proposals, pending first, then newest first. */
export async function proposalsOfField(db: Knex, organisationId: string, fieldId: string, opts: { status?: BoundaryProposal['status'] } = {}): Promise<ProposalRecord[]> {
  const q = inOrganisation(db, 'field_boundary_proposals', organisationId).where('field_id', fieldId);
  if (opts.status) q.where('status', opts.status);
  const rows: Record<string, unknown>[] = await q.orderBy('proposed_at', 'desc').orderBy('id');
  return rows.map(toProposal).sort((a, b) => Number(b.status === 'pending') - Number(a.status === 'pending'));
}

export async function insertProposal(
  db: Knex,
  organisationId: string,
  p: { id: string; fieldId: string; boundary: Boundary; areaHa: number; pointsRecorded: number; medianAccuracyM: number | null; contentHash: string; by: { id: string; name: string }; at: string },
): Promise<void> {
  await db('field_boundary_proposals').insert({
    id: p.id,
    organisation_id: organisationId,
    field_id: p.fieldId,
    boundary: JSON.stringify(p.boundary),
    area_ha: p.areaHa,
    points_recorded: p.pointsRecorded,
    median_accuracy_m: p.medianAccuracyM,
    status: 'pending',
    content_hash: p.contentHash,
    proposed_by: p.by.id,
    proposed_by_name: p.by.name,
    proposed_at: p.at,
  });
}

/** pending → accepted or declined; false when it was no longer pending (two clerks at once). */
export async function decideProposal(
  db: Knex,
  organisationId: string,
  id: string,
  d: { status: 'accepted' | 'declined'; by: { id: string; name: string }; at: string; reason: string | null },
): Promise<boolean> {
  const n = await inOrganisation(db, 'field_boundary_proposals', organisationId)
    .where({ id, status: 'pending' })
    .update({ status: d.status, decided_by: d.by.id, decided_by_name: d.by.name, decided_at: d.at, decline_reason: d.reason });
  return n === 1;
}
