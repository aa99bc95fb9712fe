import type { Knex } from 'knex';

/*
 * How a credit rule turns an estimate into a verdict (shared/calc/verdict.ts): the decision basis,
 * its confidence and the minimum number of plants, plus the edge margin the walk plan keeps. The
 * defaults are what every earlier version was judged by: the point estimate, 90 %, one plant, 10 m.
 * Walks keep the stops the sampler chose to skip (JSON list of stop numbers; null when none or sent
 * by an older phone).
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('credit_rules', (t) => {
    t.string('decision_basis', 30).notNullable().defaultTo('point');
    t.double('confidence').notNullable().defaultTo(0.9);
    t.integer('min_plants').notNullable().defaultTo(1);
    t.double('edge_margin_m').notNullable().defaultTo(10);
  });
  await knex.schema.alterTable('field_walks', (t) => {
    t.text('skipped_stops').nullable();
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('field_walks', (t) => {
    t.dropColumn('skipped_stops');
  });
  await knex.schema.alterTable('credit_rules', (t) => {
    t.dropColumn('decision_basis');
    t.dropColumn('confidence');
    t.dropColumn('min_plants');
    t.dropColumn('edge_margin_m');
  });
}
