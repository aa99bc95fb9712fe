import { createHash } from 'node:crypto';
import type { Knex } from 'knex';
import { CEREAL_CROPS } from '../shared/calc/rules';
import { addDaysIso, seasonOfDate, seasonStartYear, seasonStarting, todayIso } from '../shared/registry/season';
import type { WalkCreate } from '../shared/schemas/walks';
import { findWalkRecord, insertWalk } from '../server/walks/db';
import { walkContentHash } from '../server/walks/service';
import { estimateSnapshot } from '../server/walks/estimate';
import { mulberry32, normal } from '../scripts/prng';
import { DEMO_ORGANISATIONS, DEMO_USERS } from './demo-people';

/**
 * Last season's approved field walks for the first demo organisation, so that the demo's credit
 * register for the year that season ended in has something to show: most cereal plantings were
 * walked 5–15 days before termination, one too early, and the invented mean lengths put some above
 * and some below the threshold. Only for `npm start` (SEED_DEMO_HISTORY); tests build their own
 * scenarios. Safe to run twice.
 */
// Well above, well below and near the threshold length (about 78 cm on the demo rye curve), so that under
// the demo rule (borderline when the 90 % range spans the threshold) some walks meet, some fall below and
// some are borderline.
const MEAN_LENGTHS_CM = [112, 56, 116, 52, 120, 79, 58, 114, 83, 118];

const userId = (email: string) => DEMO_USERS.find((u) => u.email === email)!.id;
const walkId = (plantingId: string) => {
  const h = createHash('sha256').update(`demo-history|${plantingId}`).digest('hex');
  return `${h.slice(0, 8)}-${h.slice(8, 12)}-4${h.slice(13, 16)}-8${h.slice(17, 20)}-${h.slice(20, 32)}`;
};

export async function seedDemoHistory(db: Knex, today = todayIso()): Promise<void> {
  const orgId = DEMO_ORGANISATIONS[0].id;
  const lastSeason = seasonStarting(seasonStartYear(seasonOfDate(today)) - 1);
  const cereals: readonly string[] = CEREAL_CROPS;
  const plantings: { id: string; crop: string; variety: string | null; seeded_on: string; terminated_on: string }[] = await db('plantings')
    .where({ organisation_id: orgId, season: lastSeason })
    .whereNotNull('terminated_on')
    .orderBy('id');
  const sampler = userId('sampler2@crowntip.test');
  const clerk = userId('clerk@crowntip.test');
  for (const [i, p] of plantings.filter((x) => cereals.includes(x.crop)).entries()) {
    const id = walkId(p.id);
    if (await findWalkRecord(db, orgId, id)) continue;
    const rand = mulberry32(1000 + i);
    const mean = MEAN_LENGTHS_CM[i % MEAN_LENGTHS_CM.length];
    if (mean === undefined) throw new Error('MEAN_LENGTHS_CM is empty');
    const lengths = Array.from({ length: 10 }, () => Math.round(Math.max(20, mean + 9 * normal(rand)) * 2) / 2);
    const daysBefore = i === 3 ? 45 : 5 + (i % 11); // one walk too early for the rule's 30-day gap
    let walkedOn = addDaysIso(p.terminated_on, -daysBefore);
    if (walkedOn < p.seeded_on) walkedOn = p.seeded_on;
    const input: WalkCreate = {
      id,
      plantingId: p.id,
      walkedOn,
      stage: 'Z31',
      notes: 'Invented demo walk of last season.',
      plants: lengths.map((lengthCm, k) => ({ stop: k + 1, lengthCm })),
    };
    const estimate = await estimateSnapshot(db, orgId, { crop: p.crop, variety: p.variety }, lengths);
    await insertWalk(db, orgId, {
      ...input,
      stage: 'Z31',
      notes: input.notes ?? null,
      samplerId: sampler,
      status: 'approved',
      contentHash: walkContentHash(input),
      estimate,
      createdAt: `${walkedOn}T15:00:00.000Z`,
      submittedAt: `${walkedOn}T15:20:00.000Z`,
      reviewedBy: clerk,
      reviewedAt: `${addDaysIso(walkedOn, 1)}T09:00:00.000Z`,
    });
  }
}
