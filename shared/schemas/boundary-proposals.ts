import { z } from 'zod';
import { checkedBoundarySchema } from '../registry/boundary';

/**
 * A field boundary traced on the phone and sent for the office to accept (README, "Traced
 * boundaries"). The phone makes the id, so a retried send never makes a second proposal.
 */
export const boundaryProposalCreateSchema = z.object({
  id: z.uuid({ message: 'The proposal id must be a UUID made by the phone.' }),
  boundary: checkedBoundarySchema,
  /** Positions recorded while walking the edge, before the outline was simplified. */
  pointsRecorded: z.number({ message: 'Give the number of positions recorded.' }).int().min(3, 'At least 3 positions are needed for an outline.').max(100_000),
  /** Median accuracy the phone reported for those positions, metres. */
  medianAccuracyM: z.number().finite().min(0).max(10_000).nullable().optional(),
});
export type BoundaryProposalCreate = z.infer<typeof boundaryProposalCreateSchema>;

export const boundaryDeclineSchema = z.object({
  reason: z.string({ message: 'Say why the traced boundary is declined.' }).trim().min(1, 'Say why the traced boundary is declined.').max(500, 'Keep the reason under 500 characters.'),
});

export const boundaryProposalStatusSchema = z.enum(['pending', 'accepted', 'declined']);

export const boundaryProposalSchema = z.object({
  id: z.string(),
  fieldId: z.string(),
  boundary: checkedBoundarySchema,
  areaHa: z.number(),
  pointsRecorded: z.number(),
  medianAccuracyM: z.number().nullable(),
  status: boundaryProposalStatusSchema,
  proposedBy: z.object({ id: z.string().nullable(), name: z.string() }),
  proposedAt: z.string(),
  decidedBy: z.object({ id: z.string().nullable(), name: z.string() }).nullable(),
  decidedAt: z.string().nullable(),
  declineReason: z.string().nullable(),
});
export type BoundaryProposal = z.infer<typeof boundaryProposalSchema>;
