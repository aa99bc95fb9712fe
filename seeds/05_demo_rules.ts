import type { Knex } from 'knex';
import { DEMO_RULE } from '../shared/calc/rules';
import { DEMO_VERDICT_RULE } from '../shared/calc/verdict';
import { DEFAULT_EDGE_MARGIN_M } from '../shared/calc/walk-plan';
import { DEMO_ORGANISATIONS } from './demo-people';

/**
 * Version 1 of each demo organisation's credit rule: 4,500 lb/ac and 90 days (the usual values),
 * the rest invented (see DEMO_RULE), marked as demo values; walks judged by the point estimate with
 * a borderline band at 90 % and at least 10 plants (DEMO_VERDICT_RULE). Safe to run twice.
 */
export async function seedDemoRules(db: Knex): Promise<void> {
  for (const [i, org] of DEMO_ORGANISATIONS.entries()) {
    await db('credit_rules')
      .insert({
        id: `0b7d3f7e-0000-4000-8000-0000000003${String(i + 1).padStart(2, '0')}`,
        organisation_id: org.id,
        version: 1,
        effective_from: '2020-01-01',
        threshold_kg_ha: DEMO_RULE.thresholdKgHa,
        min_days_in_window: DEMO_RULE.minDaysInWindow,
        window_start: DEMO_RULE.window.start,
        window_end: DEMO_RULE.window.end,
        eligible_crops: DEMO_RULE.eligibleCrops.join(','),
        credit_kg_n_per_ha: DEMO_RULE.creditKgNPerHa,
        max_days_sample_before_termination: DEMO_RULE.maxDaysSampleBeforeTermination,
        // The point estimate decides, a 90 % range across the threshold makes it borderline, 10 plants at least.
        decision_basis: DEMO_VERDICT_RULE.decisionBasis,
        confidence: DEMO_VERDICT_RULE.confidence,
        min_plants: DEMO_VERDICT_RULE.minPlants,
        edge_margin_m: DEFAULT_EDGE_MARGIN_M,
        is_demo: true,
        notes: 'Demo values: 4,500 lb/ac and 90 days are the usual values; the window, credit and sampling gap are invented. Confirm every value with the local authority.',
        created_by: null,
        created_by_name: 'Crowntip demo',
        created_at: new Date().toISOString(),
      })
      .onConflict('id')
      .ignore();
  }
}
