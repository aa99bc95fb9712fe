import type { Knex } from 'knex';

/*
 * A lab's tissue nitrogen content for a field walk (optional, entered by the office), and an
 * append-only log of who set or cleared it and when. It never changes the walk's verdict or its
 * estimate snapshot: nitrogen in the shoots is information shown beside them.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('field_walks', (t) => {
    t.double('tissue_n_percent').nullable();
  });
  await knex.schema.createTable('walk_tissue_n_log', (t) => {
    t.increments('seq').primary();
    t.string('organisation_id', 36).notNullable().references('organisations.id').onDelete('RESTRICT');
    t.string('walk_id', 36).notNullable();
    t.double('percent').nullable(); // null: the value was cleared
    t.double('previous_percent').nullable();
    t.string('set_by', 36).nullable().references('users.id').onDelete('SET NULL');
    t.string('set_by_name', 200).notNullable();
    t.timestamp('set_at', { useTz: true }).notNullable();
    t.foreign(['organisation_id', 'walk_id']).references(['organisation_id', 'id']).inTable('field_walks').onDelete('RESTRICT');
    t.index(['organisation_id', 'walk_id']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('walk_tissue_n_log');
  await knex.schema.alterTable('field_walks', (t) => {
    t.dropColumn('tissue_n_percent');
  });
}
