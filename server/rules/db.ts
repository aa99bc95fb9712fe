import { randomUUID } from 'node:crypto';
import type { Knex } from 'knex';
import type { CreditRule, DecisionBasis } from '../../shared/calc/rules';
import type { RuleVerdictSettings } from '../../shared/schemas/rules';
import { inOrganisation, nowIso } from '../platform/scope';

export interface StoredCreditRule extends CreditRule, RuleVerdictSettings {
  id: string;
  version: number;
  effectiveFrom: string;
  isDemo: boolean;
  notes: string | null;
  createdByName: string | null;
  createdAt: string;
}

type Row = Record<string, unknown>;

const toRule = (r: Row): StoredCreditRule => ({
  id: r.id as string,
  version: Number(r.version),
  effectiveFrom: r.effective_from as string,
  thresholdKgHa: Number(r.threshold_kg_ha),
  minDaysInWindow: Number(r.min_days_in_window),
  window: { start: r.window_start as string, end: r.window_end as string },
  eligibleCrops: String(r.eligible_crops).split(',').filter(Boolean),
  creditKgNPerHa: Number(r.credit_kg_n_per_ha),
  maxDaysSampleBeforeTermination: Number(r.max_days_sample_before_termination),
  decisionBasis: r.decision_basis as DecisionBasis,
  confidence: Number(r.confidence),
  minPlants: Number(r.min_plants),
  edgeMarginM: Number(r.edge_margin_m),
  isDemo: Boolean(r.is_demo),
  notes: (r.notes as string) ?? null,
  createdByName: (r.created_by_name as string) ?? null,
  createdAt: r.created_at as string,
});

/** The version in effect on a day: the latest effective on or before it (ties: the newest version). */
export async function ruleInEffect(db: Knex, organisationId: string, onDate: string): Promise<StoredCreditRule | undefined> {
  const row = await inOrganisation(db, 'credit_rules', organisationId)
    .where('effective_from', '<=', onDate)
    .orderBy('effective_from', 'desc')
    .orderBy('version', 'desc')
    .first();
  return row && toRule(row);
}

export async function listRuleVersions(db: Knex, organisationId: string): Promise<StoredCreditRule[]> {
  const rows = await inOrganisation(db, 'credit_rules', organisationId).orderBy('version', 'desc');
  return rows.map(toRule);
}

export async function insertRuleVersion(
  db: Knex,
  organisationId: string,
  rule: CreditRule & Partial<RuleVerdictSettings> & { effectiveFrom: string; isDemo?: boolean; notes?: string | null },
  author: { id: string; name: string } | null,
): Promise<StoredCreditRule> {
  return db.transaction(async (trx) => {
    const last = await inOrganisation(trx, 'credit_rules', organisationId).max({ v: 'version' }).first();
    const id = randomUUID();
    await trx('credit_rules').insert({
      id,
      organisation_id: organisationId,
      version: Number(last?.v ?? 0) + 1,
      effective_from: rule.effectiveFrom,
      threshold_kg_ha: rule.thresholdKgHa,
      min_days_in_window: rule.minDaysInWindow,
      window_start: rule.window.start,
      window_end: rule.window.end,
      eligible_crops: rule.eligibleCrops.join(','),
      credit_kg_n_per_ha: rule.creditKgNPerHa,
      max_days_sample_before_termination: rule.maxDaysSampleBeforeTermination,
      // Left out: the column defaults, how every version before decision bases was judged.
      ...(rule.decisionBasis !== undefined && { decision_basis: rule.decisionBasis }),
      ...(rule.confidence !== undefined && { confidence: rule.confidence }),
      ...(rule.minPlants !== undefined && { min_plants: rule.minPlants }),
      ...(rule.edgeMarginM !== undefined && { edge_margin_m: rule.edgeMarginM }),
      is_demo: rule.isDemo ?? false,
      notes: rule.notes ?? null,
      created_by: author?.id ?? null,
      created_by_name: author?.name ?? null,
      created_at: nowIso(),
    });
    return toRule(await trx('credit_rules').where('id', id).first());
  });
}
