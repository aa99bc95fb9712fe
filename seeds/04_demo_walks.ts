import type { Knex } from 'knex';
import { CEREAL_CROPS } from '../shared/calc/rules';
import { seasonOfDate, todayIso } from '../shared/registry/season';
import type { WalkCreate } from '../shared/schemas/walks';
import { duePlantings, findWalkRecord, insertWalk } from '../server/walks/db';
import { walkContentHash } from '../server/walks/service';
import { estimateSnapshot } from '../server/walks/estimate';
import { DEMO_ORGANISATIONS, DEMO_USERS } from './demo-people';

/**
 * The demo's field walks: six of this season's cereal plantings of the first organisation are
 * assigned to sampler@crowntip.test, and sampler2@crowntip.test has walked two others (one
 * submitted, one approved by the clerk). The lengths are invented. The estimates are computed by
 * the API's own service; without an assigned calibration a walk has no estimate. Safe to run twice.
 */
export const DEMO_WALK_IDS = { submitted: '0b7d3f7e-0000-4000-8000-000000000401', approved: '0b7d3f7e-0000-4000-8000-000000000402' } as const;

const userId = (email: string) => DEMO_USERS.find((u) => u.email === email)!.id;
const addDays = (iso: string, days: number) => new Date(Date.parse(`${iso}T00:00:00Z`) + days * 86_400_000).toISOString().slice(0, 10);
const maxDate = (a: string, b: string) => (a > b ? a : b);

/** Invented main shoot lengths (cm), one plant per stop. */
const DEMO_LENGTHS = {
  submitted: [84.5, 77.0, 91.5, 80.0, 73.5, 88.0, 79.0, 86.5, 82.0, 76.5],
  approved: [66.0, 71.5, 62.5, 69.0, 74.0, 64.5, 70.0, 67.5, 72.0, 65.0],
};

export async function seedDemoWalks(db: Knex, today = todayIso()): Promise<void> {
  const orgId = DEMO_ORGANISATIONS[0].id;
  const sampler = userId('sampler@crowntip.test');
  const sampler2 = userId('sampler2@crowntip.test');
  const clerk = userId('clerk@crowntip.test');
  const cereals: readonly string[] = CEREAL_CROPS;
  const due = (await duePlantings(db, orgId, { season: seasonOfDate(today), today })).filter((p) => cereals.includes(p.crop));
  const now = new Date().toISOString();
  const notAfterNow = (iso: string) => (iso < now ? iso : now);

  const assign = async (plantingId: string, samplerId: string, dueOn: string | null) =>
    db('walk_assignments')
      .insert({ organisation_id: orgId, planting_id: plantingId, sampler_id: samplerId, due_on: dueOn, created_by: clerk, created_at: now })
      .onConflict(['planting_id', 'sampler_id'])
      .ignore();
  for (const [i, p] of due.slice(0, 6).entries()) await assign(p.plantingId, sampler, addDays(today, 3 + i * 2));

  const walks = [
    { id: DEMO_WALK_IDS.submitted, planting: due[6], lengths: DEMO_LENGTHS.submitted, daysAgo: 2, approved: false },
    { id: DEMO_WALK_IDS.approved, planting: due[7], lengths: DEMO_LENGTHS.approved, daysAgo: 9, approved: true },
  ];
  for (const w of walks) {
    if (!w.planting) continue; // a registry too small for the demo walks
    await assign(w.planting.plantingId, sampler2, null);
    if (await findWalkRecord(db, orgId, w.id)) continue;
    const walkedOn = maxDate(w.planting.seededOn, addDays(today, -w.daysAgo));
    const input: WalkCreate = {
      id: w.id,
      plantingId: w.planting.plantingId,
      walkedOn,
      stage: w.approved ? 'Z32' : 'Z31',
      notes: 'Invented demo walk.',
      plants: w.lengths.map((lengthCm, i) => ({ stop: i + 1, lengthCm })),
    };
    const estimate = await estimateSnapshot(db, orgId, w.planting, w.lengths);
    await db.transaction(async (trx) => {
      await insertWalk(trx, orgId, {
        ...input,
        stage: input.stage ?? null,
        notes: input.notes ?? null,
        samplerId: sampler2,
        status: w.approved ? 'approved' : 'submitted',
        contentHash: walkContentHash(input),
        estimate,
        createdAt: notAfterNow(`${walkedOn}T15:00:00.000Z`),
        submittedAt: notAfterNow(`${walkedOn}T15:20:00.000Z`),
        reviewedBy: w.approved ? clerk : null,
        reviewedAt: w.approved ? now : null,
      });
    });
  }
}
