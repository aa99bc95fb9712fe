import type { Knex } from 'knex';

/*
 * Nobody approves their own walk, unless an admin waives that rule for one walk with a reason (an
 * organisation with a single office person): who waived it, when and why stay on the walk.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('field_walks', (t) => {
    t.string('own_review_waived_by', 36).nullable();
    t.timestamp('own_review_waived_at', { useTz: true }).nullable();
    t.text('own_review_waiver_reason').nullable();
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('field_walks', (t) => {
    t.dropColumn('own_review_waiver_reason');
    t.dropColumn('own_review_waived_at');
    t.dropColumn('own_review_waived_by');
  });
}
