import type { Knex } from 'knex';
import type { Mailer } from '../mail/public';
import { addDaysIso } from '../../shared/registry/season';
import { CROP_LABELS } from '../../shared/registry/crops';
import { activeAssignees, allWalkAssignments, plantingsEndingWithoutApprovedWalk } from './db';

export interface ReminderItem {
  plantingId: string;
  ranchName: string;
  fieldName: string;
  crop: string;
  terminationOn: string;
}

export interface ReminderResult {
  messages: number;
  samplers: { email: string; plantings: number }[];
}

/**
 * Plantings whose termination is near (planned within `daysAhead` days from today, not yet
 * terminated) and that have no approved walk, for each active sampler: the plantings assigned to
 * them, or, for a sampler with no assignments, every such planting of their organisation (the same
 * rule as the capture app's "today" list).
 */
// Runs across organisations (a daily job): each sampler only ever gets plantings of their own
// organisation, matched on organisation_id below.
export async function dueForReminder(db: Knex, today: string, daysAhead: number) {
  const until = addDaysIso(today, daysAhead);
  const plantings = await plantingsEndingWithoutApprovedWalk(db, today, until);
  const samplers = await activeAssignees(db);
  const assignments = await allWalkAssignments(db);
  const assignedTo = new Map<string, Set<string>>();
  for (const a of assignments) {
    if (!assignedTo.has(a.sampler_id)) assignedTo.set(a.sampler_id, new Set());
    assignedTo.get(a.sampler_id)!.add(a.planting_id);
  }
  return samplers
    .map((s) => {
      const mine = assignedTo.get(s.id);
      const items: ReminderItem[] = plantings
        .filter((p) => p.organisation_id === s.organisation_id && (!mine || mine.has(p.id)))
        .map((p) => ({ plantingId: p.id, ranchName: p.ranch_name, fieldName: p.field_name, crop: p.crop, terminationOn: p.planned_termination_on }));
      return { sampler: s, items };
    })
    .filter((x) => x.items.length > 0);
}

export async function sendSamplingReminders(db: Knex, mailer: Mailer, opts: { today: string; daysAhead: number; publicUrl: string }): Promise<ReminderResult> {
  const due = await dueForReminder(db, opts.today, opts.daysAhead);
  const result: ReminderResult = { messages: 0, samplers: [] };
  for (const { sampler, items } of due) {
    const lines = items.map((i) => `- ${i.ranchName} · ${i.fieldName} (${CROP_LABELS[i.crop as keyof typeof CROP_LABELS] ?? i.crop}): termination planned ${i.terminationOn}`);
    await mailer.send({
      organisationId: sampler.organisation_id,
      to: sampler.email,
      subject: `Crowntip: ${items.length} field${items.length === 1 ? '' : 's'} to walk before termination`,
      text: [
        `Hello ${sampler.name},`,
        '',
        `These plantings are due to be terminated within ${opts.daysAhead} days and have no approved field walk yet:`,
        ...lines,
        '',
        `Open the capture app to walk them: ${opts.publicUrl}/capture`,
        '',
        'Field safety: carry the spade blade-down, mind uneven and muddy ground, and wear gloves. Cereal pollen can irritate eyes and airways.',
      ].join('\n'),
    });
    result.messages += 1;
    result.samplers.push({ email: sampler.email, plantings: items.length });
  }
  return result;
}
