/** What other resources may use of the credit rule: the rule in effect. */
export { creditRuleForYear, currentCreditRule, type RuleInUse } from './service';
