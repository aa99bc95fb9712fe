import type { Knex } from 'knex';
import type { Mailer } from '../mail/public';
import { addDaysIso } from '../../shared/registry/season';
import { cropName } from '../../shared/registry/crops';
import { date } from '../../shared/format/figures';
import { isoDay } from '../platform/column-values';
import { activeAssignees, allWalkAssignments, assignedPlantingsDue, plantingsEndingWithoutApprovedWalk } from './db';

export interface ReminderItem {
  plantingId: string;
  ranchName: string;
  fieldName: string;
  crop: string;
  /** Planned termination, YYYY-MM-DD (null for an assigned planting with a due date and none planned). */
  terminationOn: string | null;
  /** The assignment's due-by date, when the sampler was asked to walk it by a day. */
  dueOn: string | null;
}

export interface ReminderResult {
  messages: number;
  samplers: { email: string; plantings: number }[];
}

/**
 * What each active sampler is reminded of. A sampler with assignments: the plantings assigned to
 * them, by the due date they were given (due within `daysAhead` days, or already overdue), or by
 * planned termination within `daysAhead` days when the assignment has no due date. A sampler with no
 * assignments: every planting of their organisation planned for termination within `daysAhead` days
 * (the same rule as the capture app's list). Only plantings not yet terminated and with no approved
 * walk; the soonest first.
 */
// Runs across organisations (a daily job): each sampler only ever gets plantings of their own
// organisation, matched on organisation_id below.
export async function dueForReminder(db: Knex, today: string, daysAhead: number) {
  const until = addDaysIso(today, daysAhead);
  const [plantings, assignedDue, samplers, assignments] = await Promise.all([
    plantingsEndingWithoutApprovedWalk(db, today, until),
    assignedPlantingsDue(db, today, until),
    activeAssignees(db),
    allWalkAssignments(db),
  ]);
  const hasAssignments = new Set(assignments.map((a) => a.sampler_id));
  const when = (i: ReminderItem) => i.dueOn ?? i.terminationOn ?? '';
  return samplers
    .map((s) => {
      const items: ReminderItem[] = hasAssignments.has(s.id)
        ? assignedDue
            .filter((p) => p.sampler_id === s.id && p.organisation_id === s.organisation_id)
            .map((p) => ({ plantingId: p.id, ranchName: p.ranch_name, fieldName: p.field_name, crop: p.crop, terminationOn: isoDay(p.planned_termination_on), dueOn: isoDay(p.due_on) }))
        : plantings
            .filter((p) => p.organisation_id === s.organisation_id)
            .map((p) => ({ plantingId: p.id, ranchName: p.ranch_name, fieldName: p.field_name, crop: p.crop, terminationOn: isoDay(p.planned_termination_on), dueOn: null }));
      items.sort((a, b) => when(a).localeCompare(when(b)));
      return { sampler: s, items };
    })
    .filter((x) => x.items.length > 0);
}

/** One planting's line in the reminder, dates in words: "walk by Mar 1, 2027" or "overdue since …". */
export function reminderLine(i: ReminderItem, today: string): string {
  const planned = i.terminationOn ? `termination planned ${date(i.terminationOn)}` : 'no termination planned yet';
  const due = i.dueOn ? (i.dueOn < today ? `overdue: it was due by ${date(i.dueOn)}; ` : `walk by ${date(i.dueOn)}; `) : '';
  return `- ${i.ranchName} · ${i.fieldName} (${cropName(i.crop)}): ${due}${planned}`;
}

export async function sendSamplingReminders(db: Knex, mailer: Mailer, opts: { today: string; daysAhead: number; publicUrl: string }): Promise<ReminderResult> {
  const due = await dueForReminder(db, opts.today, opts.daysAhead);
  const result: ReminderResult = { messages: 0, samplers: [] };
  for (const { sampler, items } of due) {
    const lines = items.map((i) => reminderLine(i, opts.today));
    await mailer.send({
      organisationId: sampler.organisation_id,
      to: sampler.email,
      subject: `Crowntip: ${items.length} field${items.length === 1 ? '' : 's'} to walk before termination`,
      text: [
        `Hello ${sampler.name},`,
        '',
        items.some((i) => i.dueOn)
          ? `These plantings are yours to walk by the date given, or are due to be terminated within ${opts.daysAhead} days, and have no approved field walk yet:`
          : `These plantings are due to be terminated within ${opts.daysAhead} days and have no approved field walk yet:`,
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
