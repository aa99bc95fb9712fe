import { createHash } from 'node:crypto';
import type { Knex } from 'knex';
import { HttpError } from '../platform/errors';
import { nowIso } from '../platform/scope';
import { boundaryProblemText, checkBoundary } from '../../shared/registry/boundary';
import { boundaryAreaHa } from '../../shared/registry/boundary-area';
import type { BoundaryProposal, BoundaryProposalCreate } from '../../shared/schemas/boundary-proposals';
import * as proposals from './boundary-proposals-db';
import { getField } from './fields-db';
import { updateField, type Actor } from './service';
import { inTransaction } from '../platform/database';

/**
 * Boundaries traced on the phone (README, "Traced boundaries"): a sampler proposes, the office
 * accepts (the outline becomes the field's boundary through the same update as the field form, so
 * the change history records it like any boundary edit) or declines with a reason. The phone's id
 * makes a re-sent proposal answer the stored one, never a second record.
 */

const strip = ({ contentHash: _hash, ...p }: proposals.ProposalRecord): BoundaryProposal => p;

function isUniqueViolation(err: unknown): boolean {
  const code = (err as { code?: string })?.code;
  return code === 'SQLITE_CONSTRAINT_PRIMARYKEY' || code === 'SQLITE_CONSTRAINT_UNIQUE' || code === '23505';
}

const hashOf = (fieldId: string, input: BoundaryProposalCreate) =>
  createHash('sha256')
    .update(JSON.stringify([fieldId, input.boundary, input.pointsRecorded, input.medianAccuracyM ?? null]))
    .digest('hex');

async function fieldOf(db: Knex, actor: Actor, fieldId: string) {
  const field = await getField(db, actor.organisationId, fieldId);
  if (!field) throw new HttpError('not_found');
  return field;
}

export async function proposeBoundary(db: Knex, actor: Actor, fieldId: string, input: BoundaryProposalCreate): Promise<{ proposal: BoundaryProposal; created: boolean }> {
  await fieldOf(db, actor, fieldId);
  const hash = hashOf(fieldId, input);
  const same = async (found: proposals.ProposalRecord | undefined) => {
    // Another organisation's id finds nothing here: a conflict that tells nothing about it.
    if (!found || found.contentHash !== hash || found.fieldId !== fieldId) {
      throw new HttpError('conflict', 'A different traced boundary with this id is already stored. Make a new id for a new outline.');
    }
    return { proposal: strip(found), created: false };
  };
  const before = await proposals.getProposal(db, actor.organisationId, input.id);
  if (before) return same(before);
  try {
    await proposals.insertProposal(db, actor.organisationId, {
      id: input.id,
      fieldId,
      boundary: input.boundary,
      areaHa: boundaryAreaHa(input.boundary),
      pointsRecorded: input.pointsRecorded,
      medianAccuracyM: input.medianAccuracyM ?? null,
      contentHash: hash,
      by: { id: actor.id, name: actor.name },
      at: nowIso(),
    });
  } catch (err) {
    if (!isUniqueViolation(err)) throw err;
    return same(await proposals.getProposal(db, actor.organisationId, input.id));
  }
  return { proposal: strip((await proposals.getProposal(db, actor.organisationId, input.id))!), created: true };
}

export async function listProposals(db: Knex, actor: Actor, fieldId: string, status?: BoundaryProposal['status']): Promise<BoundaryProposal[]> {
  await fieldOf(db, actor, fieldId);
  return (await proposals.proposalsOfField(db, actor.organisationId, fieldId, { status })).map(strip);
}

async function proposalOf(db: Knex, actor: Actor, fieldId: string, id: string) {
  const p = await proposals.getProposal(db, actor.organisationId, id);
  if (!p || p.fieldId !== fieldId) throw new HttpError('not_found');
  return p;
}

/** The outline becomes the field's boundary; accepting again answers it unchanged; a declined one is a conflict. */
export async function acceptProposal(db: Knex, actor: Actor, fieldId: string, id: string): Promise<BoundaryProposal> {
  return inTransaction(db, async (trx) => {
    const p = await proposalOf(trx, actor, fieldId, id);
    if (p.status === 'accepted') return strip(p);
    if (p.status !== 'pending') throw new HttpError('conflict', 'This traced boundary was declined; it cannot be accepted now.');
    // Checked again: what was valid when sent must still be valid when it becomes the boundary.
    const valid = checkBoundary(p.boundary);
    if (!valid.ok) throw new HttpError('invalid', boundaryProblemText(valid.problem), { boundary: boundaryProblemText(valid.problem) });
    await updateField(trx, actor, fieldId, { boundary: p.boundary });
    if (!(await proposals.decideProposal(trx, actor.organisationId, id, { status: 'accepted', by: actor, at: nowIso(), reason: null }))) {
      throw new HttpError('conflict', 'Someone else decided on this traced boundary at the same moment.');
    }
    return strip((await proposals.getProposal(trx, actor.organisationId, id))!);
  });
}

/** Declined with a reason, the field unchanged; declining again answers it unchanged; an accepted one is a conflict. */
export async function declineProposal(db: Knex, actor: Actor, fieldId: string, id: string, reason: string): Promise<BoundaryProposal> {
  const p = await proposalOf(db, actor, fieldId, id);
  if (p.status === 'declined') return strip(p);
  if (p.status !== 'pending') throw new HttpError('conflict', 'This traced boundary is already the field’s boundary.');
  if (!(await proposals.decideProposal(db, actor.organisationId, id, { status: 'declined', by: actor, at: nowIso(), reason }))) {
    throw new HttpError('conflict', 'Someone else decided on this traced boundary at the same moment.');
  }
  return strip((await proposals.getProposal(db, actor.organisationId, id))!);
}
