import type { Knex } from 'knex';

// Credit rules, versioned per organisation with an effective date: a register uses the version in
// effect for its year, so a later change never rewrites an earlier year's verdicts.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('credit_rules', (t) => {
    t.string('id', 36).primary();
    t.string('organisation_id', 36).notNullable().references('organisations.id').onDelete('RESTRICT');
    t.integer('version').notNullable();
    t.date('effective_from').notNullable();
    t.double('threshold_kg_ha').notNullable();
    t.integer('min_days_in_window').notNullable();
    t.string('window_start', 5).notNullable(); // MM-DD
    t.string('window_end', 5).notNullable();
    t.string('eligible_crops', 500).notNullable(); // comma-separated crop codes
    t.double('credit_kg_n_per_ha').notNullable();
    t.integer('max_days_sample_before_termination').notNullable();
    t.boolean('is_demo').notNullable().defaultTo(false);
    t.text('notes').nullable();
    t.string('created_by', 36).nullable();
    t.string('created_by_name', 200).nullable();
    t.timestamp('created_at', { useTz: true }).notNullable();
    t.unique(['organisation_id', 'version']);
    t.index(['organisation_id', 'effective_from']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('credit_rules');
}
