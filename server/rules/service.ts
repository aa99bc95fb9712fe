import { HttpError } from '../platform/errors';
import type { Knex } from 'knex';
import { DEMO_RULE, type CreditRule } from '../../shared/calc/rules';
import { DEMO_VERDICT_RULE } from '../../shared/calc/verdict';
import { DEFAULT_EDGE_MARGIN_M } from '../../shared/calc/walk-plan';
import { todayIso } from '../../shared/registry/season';
import type { CreditRuleInput, RuleVerdictSettings } from '../../shared/schemas/rules';
import { insertRuleVersion, ruleInEffect, type StoredCreditRule } from './db';

export type RuleInUse = CreditRule &
  RuleVerdictSettings & {
    label: string;
    id: string | null;
    version: number | null;
    effectiveFrom: string | null;
    isDemo: boolean;
  };

/** The demo rule's way of judging, used when an organisation has saved no rule version yet. */
export const DEMO_VERDICT_SETTINGS: Readonly<RuleVerdictSettings> = Object.freeze({ ...DEMO_VERDICT_RULE, edgeMarginM: DEFAULT_EDGE_MARGIN_M });

const describe = (r: StoredCreditRule) =>
  `version ${r.version}, in effect from ${r.effectiveFrom}${r.isDemo ? ' (demo values, not confirmed with the local authority)' : ''}`;

function inUse(stored: StoredCreditRule | undefined): RuleInUse {
  if (!stored) {
    // No version recorded yet: the typical values, plainly marked as unconfirmed.
    return {
      ...DEMO_RULE,
      ...DEMO_VERDICT_SETTINGS,
      eligibleCrops: [...DEMO_RULE.eligibleCrops],
      label: 'typical values; no rule has been set for this organisation',
      id: null,
      version: null,
      effectiveFrom: null,
      isDemo: true,
    };
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

/**
 * Saves a new rule version. A client that leaves out how walks are judged (an older API client)
 * keeps the choice of the version in effect, so a threshold change never silently changes the basis.
 */
export async function saveRuleVersion(db: Knex, organisationId: string, input: CreditRuleInput, author: { id: string; name: string } | null): Promise<StoredCreditRule> {
  const { effectiveFrom, notes, decisionBasis, confidence, minPlants, edgeMarginM, ...rule } = input;
  // A back-dated version would silently change the drafts of years already reported on (each year
  // uses the version in effect on its 1 January), so a new version starts today or later.
  const today = todayIso();
  if (effectiveFrom && effectiveFrom < today) {
    const message = `A new rule version cannot start in the past: it would change registers already drafted for earlier dates. Choose today (${today}) or a later date.`;
    throw new HttpError('invalid', message, { effectiveFrom: message });
  }
  const current = await currentCreditRule(db, organisationId);
  return insertRuleVersion(
    db,
    organisationId,
    {
      ...rule,
      decisionBasis: decisionBasis ?? current.decisionBasis,
      confidence: confidence ?? current.confidence,
      minPlants: minPlants ?? current.minPlants,
      edgeMarginM: edgeMarginM ?? current.edgeMarginM,
      effectiveFrom: effectiveFrom ?? today,
      notes,
    },
    author,
  );
}

// Single-query reads and writes the routes and pages use as they are (SQL stays in the db modules).
export { listRuleVersions } from './db';
