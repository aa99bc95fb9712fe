import type { Knex } from 'knex';
import { DEMO_RULE, type CreditRule } from '../../shared/calc/rules';
import { todayIso } from '../../shared/registry/season';
import { ruleInEffect, type StoredCreditRule } from './db';

export type RuleInUse = CreditRule & {
  label: string;
  id: string | null;
  version: number | null;
  effectiveFrom: string | null;
  isDemo: boolean;
};

const describe = (r: StoredCreditRule) =>
  `version ${r.version}, in effect from ${r.effectiveFrom}${r.isDemo ? ' (demo values, not confirmed with the local authority)' : ''}`;

function inUse(stored: StoredCreditRule | undefined): RuleInUse {
  if (!stored) {
    // No version recorded yet: the typical values, plainly marked as unconfirmed.
    return { ...DEMO_RULE, eligibleCrops: [...DEMO_RULE.eligibleCrops], label: 'typical values; no rule has been set for this organisation', id: null, version: null, effectiveFrom: null, isDemo: true };
  }
  const { id, version, effectiveFrom, isDemo, notes: _n, createdByName: _c, createdAt: _a, ...rule } = stored;
  return { ...rule, id, version, effectiveFrom, isDemo, label: describe(stored) };
}

/** The organisation's credit rule in effect today (or on `onDate`). */
export async function currentCreditRule(db: Knex, organisationId: string, onDate = todayIso()): Promise<RuleInUse> {
  return inUse(await ruleInEffect(db, organisationId, onDate));
}

/**
 * The rule a register for reporting year Y uses: the version in effect on 1 January of Y, the
 * start of the year the grower reports on. A later version never changes an earlier year.
 */
export async function creditRuleForYear(db: Knex, organisationId: string, year: number): Promise<RuleInUse> {
  return inUse(await ruleInEffect(db, organisationId, `${year}-01-01`));
}
// Single-query reads and writes the routes and pages use as they are (SQL stays in the db modules).
export { insertRuleVersion, listRuleVersions } from './db';
