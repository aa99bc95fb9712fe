import type { Knex } from 'knex';
import { DEMO_RULE, type CreditRule } from '../../shared/calc/rules';

/**
 * The credit rule an organisation's pages and registers use. Until administrators can set and
 * version their own rule (the rules issue), every organisation uses the demo scenario's values,
 * from this one place.
 */
export async function currentCreditRule(_db: Knex, _organisationId: string): Promise<CreditRule & { label: string }> {
  return { ...DEMO_RULE, eligibleCrops: [...DEMO_RULE.eligibleCrops], label: 'demo values, not yet confirmed with the local authority' };
}
