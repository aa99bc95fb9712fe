import type { Knex } from 'knex';

/*
 * The walk plan a walk was made with, so the office can draw the planned stops again beside the
 * plants' GPS points (shared/calc/walk-plan.ts): the seed the phone drew the stops from, the number
 * of stops planned, and the edge margin of the credit rule in effect when the walk was stored.
 * Walks stored before this keep nulls: their plan cannot be redrawn.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('field_walks', (t) => {
    t.string('plan_seed', 64).nullable();
    t.integer('plan_stops').nullable();
    t.double('plan_edge_margin_m').nullable();
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('field_walks', (t) => {
    t.dropColumn('plan_edge_margin_m');
    t.dropColumn('plan_stops');
    t.dropColumn('plan_seed');
  });
}
