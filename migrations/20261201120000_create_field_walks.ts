import type { Knex } from 'knex';

/*
 * Field walks: one sampling visit to one planting (its id is the UUID the capture app made, so a
 * retried upload finds the same row), the plant measured at each stop, one photo per stop, and
 * which sampler a clerk asked to walk which planting. The estimate is a JSON snapshot taken when
 * the walk was stored; later calibration versions never change it.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('field_walks', (t) => {
    t.string('id', 36).primary();
    t.string('organisation_id', 36).notNullable().references('organisations.id').onDelete('RESTRICT');
    t.string('planting_id', 36).notNullable().references('plantings.id').onDelete('RESTRICT');
    t.string('sampler_id', 36).notNullable().references('users.id').onDelete('RESTRICT');
    t.date('walked_on').notNullable();
    t.string('stage', 20).nullable();
    t.text('notes').nullable();
    t.string('status', 16).notNullable(); // draft | submitted | approved | rejected
    t.text('reject_reason').nullable();
    t.string('content_hash', 64).notNullable(); // sha256 of the posted content, for idempotent re-posts
    t.text('estimate').nullable(); // JSON snapshot; null when no calibration was assigned
    t.timestamp('created_at', { useTz: true }).notNullable();
    t.timestamp('submitted_at', { useTz: true }).nullable();
    t.string('reviewed_by', 36).nullable().references('users.id').onDelete('RESTRICT');
    t.timestamp('reviewed_at', { useTz: true }).nullable();
    t.index(['organisation_id', 'status']);
    t.index(['planting_id']);
  });
  await knex.schema.createTable('walk_plants', (t) => {
    t.string('walk_id', 36).notNullable().references('field_walks.id').onDelete('CASCADE');
    t.string('organisation_id', 36).notNullable().references('organisations.id').onDelete('RESTRICT');
    t.integer('stop').notNullable();
    t.double('length_cm').notNullable();
    t.double('lat').nullable();
    t.double('lon').nullable();
    t.primary(['walk_id', 'stop']);
  });
  await knex.schema.createTable('walk_photos', (t) => {
    t.string('id', 36).primary();
    t.string('walk_id', 36).notNullable().references('field_walks.id').onDelete('CASCADE');
    t.string('organisation_id', 36).notNullable().references('organisations.id').onDelete('RESTRICT');
    t.integer('stop').notNullable();
    t.string('path', 500).notNullable(); // relative to UPLOADS_DIR
    t.string('content_type', 50).notNullable();
    t.integer('size').notNullable();
    t.timestamp('created_at', { useTz: true }).notNullable();
    t.unique(['walk_id', 'stop']);
  });
  await knex.schema.createTable('walk_assignments', (t) => {
    t.string('organisation_id', 36).notNullable().references('organisations.id').onDelete('RESTRICT');
    t.string('planting_id', 36).notNullable().references('plantings.id').onDelete('CASCADE');
    t.string('sampler_id', 36).notNullable().references('users.id').onDelete('CASCADE');
    t.date('due_on').nullable();
    t.string('created_by', 36).nullable().references('users.id').onDelete('SET NULL');
    t.timestamp('created_at', { useTz: true }).notNullable();
    t.primary(['planting_id', 'sampler_id']);
    t.index(['organisation_id', 'sampler_id']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('walk_assignments');
  await knex.schema.dropTable('walk_photos');
  await knex.schema.dropTable('walk_plants');
  await knex.schema.dropTable('field_walks');
}
