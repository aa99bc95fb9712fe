import type { Knex } from 'knex';

/*
 * Credit registers: one row per finalised version of a ranch's register for a reporting year.
 * The snapshot is the canonical JSON of everything the register shows (rows, totals, rule,
 * calibration versions, walk ids, who and when); content_hash is its SHA-256. Rows are only ever
 * inserted: a later change is a new version (an amendment) pointing at the one before. The unique
 * index makes two concurrent finalisations unable to take the same version number.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('registers', (t) => {
    t.string('id', 36).primary();
    t.string('organisation_id', 36).notNullable().references('organisations.id').onDelete('RESTRICT');
    t.string('ranch_id', 36).notNullable().references('ranches.id').onDelete('RESTRICT');
    t.integer('year').notNullable();
    t.integer('version').notNullable();
    t.string('previous_id', 36).nullable().references('registers.id').onDelete('RESTRICT');
    t.text('snapshot').notNullable();
    t.string('content_hash', 64).notNullable();
    t.string('rule_id', 36).nullable(); // null when the register used the typical values (no rule set)
    t.integer('rule_version').nullable();
    t.string('finalised_by', 36).nullable().references('users.id').onDelete('RESTRICT');
    t.string('finalised_by_name', 200).notNullable();
    t.timestamp('finalised_at', { useTz: true }).notNullable();
    t.unique(['organisation_id', 'ranch_id', 'year', 'version']);
    t.index(['organisation_id', 'year']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('registers');
}
