import { useMemo } from 'react';
import { useQuery } from '@tanstack/react-query';
import { rulesQuery } from './estimate-inputs';
import { ruleSettings } from './rule-settings';

/** The credit rule kept on the phone, with the demo decision settings filled in where it has none. */
export function useRuleSettings() {
  const rules = useQuery(rulesQuery);
  return useMemo(() => (rules.data ? ruleSettings(rules.data) : undefined), [rules.data]);
}
