import { DECISION_BASES, type DecisionBasis } from '../../shared/calc/rules';
import { DEMO_VERDICT_RULE, type VerdictRule } from '../../shared/calc/verdict';
import { DEFAULT_EDGE_MARGIN_M } from '../../shared/calc/walk-plan';
import type { CurrentRules } from './estimate-inputs';

/** What the phone needs of the credit rule: the verdict's rule and the walk plan's edge margin. */
export interface RuleSettings extends VerdictRule {
  edgeMarginM: number;
}

/**
 * The rule's decision basis, confidence, minimum plants and edge margin, each taken from the server
 * when it sends a usable value, else the demo values (point_with_borderline, 90 %, 10 plants, 10 m)
 * that the server also uses while a rule version has none.
 */
export function ruleSettings(rules: Pick<CurrentRules, 'thresholdKgHa' | 'decisionBasis' | 'confidence' | 'minPlants' | 'edgeMarginM'>): RuleSettings {
  const basis = DECISION_BASES.includes(rules.decisionBasis as DecisionBasis) ? (rules.decisionBasis as DecisionBasis) : DEMO_VERDICT_RULE.decisionBasis;
  const c = rules.confidence;
  const confidence = typeof c === 'number' && c > 0 && c < 1 ? c : DEMO_VERDICT_RULE.confidence;
  const m = rules.minPlants;
  const minPlants = typeof m === 'number' && Number.isInteger(m) && m >= 1 ? m : DEMO_VERDICT_RULE.minPlants;
  const e = rules.edgeMarginM;
  const edgeMarginM = typeof e === 'number' && Number.isFinite(e) && e >= 0 ? e : DEFAULT_EDGE_MARGIN_M;
  return { thresholdKgHa: rules.thresholdKgHa, decisionBasis: basis, confidence, minPlants, edgeMarginM };
}
