import type { Knex } from 'knex';
import { computeRegisters, getFinalRegister, ruleOfRegister, seasonOfYear, summarise, type RegisterRule, type RegisterTotals } from './service';
import { creditRuleForYear } from '../rules/public';
import { latestRegistersOfYear } from './db';

/** The organisation's overview of a reporting year: each ranch's draft or latest final register, and the totals. */
export interface RanchSummary {
  ranchId: string;
  ranchName: string;
  draft: RegisterTotals;
  final: { id: string; version: number; contentHash: string; finalisedAt: string; totals: RegisterTotals } | null;
  /** The totals the overview shows: the newest finalised version's, else the draft's. */
  shown: RegisterTotals;
}

export interface OrganisationSummary {
  year: number;
  season: string;
  rule: RegisterRule;
  ranches: RanchSummary[];
  totals: RegisterTotals;
}

const addTotals = (a: RegisterTotals, b: RegisterTotals): RegisterTotals => {
  const out = { ...a };
  for (const k of Object.keys(b) as (keyof RegisterTotals)[]) out[k] = a[k] + b[k];
  return out;
};

/** Per-ranch totals for a year (the newest finalised version where there is one, else the draft), for the overview and its chart. */
export async function organisationSummary(db: Knex, organisationId: string, year: number, today: string): Promise<OrganisationSummary> {
  const drafts = await computeRegisters(db, organisationId, year, today);
  const finals = await latestRegistersOfYear(db, organisationId, year);
  const ranches: RanchSummary[] = [];
  for (const d of drafts) {
    const f = finals.get(d.ranch.id);
    const final = f ? await getFinalRegister(db, organisationId, f.id) : undefined;
    const finalSummary = final ? { id: final.id, version: final.version, contentHash: final.contentHash, finalisedAt: final.finalisedAt, totals: final.totals } : null;
    ranches.push({ ranchId: d.ranch.id, ranchName: d.ranch.name, draft: d.totals, final: finalSummary, shown: finalSummary?.totals ?? d.totals });
  }
  const rule = drafts[0]?.rule ?? ruleOfRegister(await creditRuleForYear(db, organisationId, year));
  return { year, season: seasonOfYear(year), rule, ranches, totals: ranches.reduce((acc, r) => addTotals(acc, r.shown), summarise([])) };
}
