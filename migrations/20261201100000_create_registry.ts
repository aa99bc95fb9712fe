import type { Knex } from 'knex';

// The farm registry: ranches, their fields, and each season's cover-crop planting on a field.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('crops', (t) => {
    t.string('code', 32).primary();
    t.string('label', 100).notNullable();
    t.string('crop_class', 16).notNullable(); // cereal | legume | mix | other
    t.integer('sort_order').notNullable();
  });
  await knex.schema.createTable('ranches', (t) => {
    t.string('id', 36).primary();
    t.string('organisation_id', 36).notNullable().references('organisations.id').onDelete('RESTRICT');
    t.string('name', 200).notNullable();
    t.string('code', 40).nullable();
    t.string('county', 100).nullable();
    t.text('notes').nullable();
    t.string('contact_emails', 1000).nullable(); // grower addresses that registers are sent to
    t.timestamp('created_at', { useTz: true }).notNullable();
    t.timestamp('updated_at', { useTz: true }).notNullable();
    t.unique(['organisation_id', 'name']);
  });
  await knex.schema.createTable('fields', (t) => {
    t.string('id', 36).primary();
    t.string('organisation_id', 36).notNullable().references('organisations.id').onDelete('RESTRICT');
    t.string('ranch_id', 36).notNullable().references('ranches.id').onDelete('RESTRICT');
    t.string('name', 200).notNullable();
    t.double('area_ha').notNullable();
    t.text('boundary').nullable(); // GeoJSON Polygon or MultiPolygon, WGS84
    t.double('boundary_area_ha').nullable(); // computed from the boundary when it was stored
    t.text('notes').nullable();
    t.timestamp('created_at', { useTz: true }).notNullable();
    t.timestamp('updated_at', { useTz: true }).notNullable();
    t.unique(['ranch_id', 'name']);
    t.index(['organisation_id', 'ranch_id']);
  });
  await knex.schema.createTable('plantings', (t) => {
    t.string('id', 36).primary();
    t.string('organisation_id', 36).notNullable().references('organisations.id').onDelete('RESTRICT');
    t.string('field_id', 36).notNullable().references('fields.id').onDelete('RESTRICT');
    t.string('season', 7).notNullable(); // "2026-27": the winter the cover crop grows through
    t.string('crop', 32).notNullable().references('crops.code');
    t.string('variety', 200).nullable();
    t.date('seeded_on').notNullable();
    t.double('seeding_rate_kg_ha').nullable();
    t.date('planned_termination_on').nullable();
    t.date('terminated_on').nullable();
    t.text('notes').nullable();
    t.timestamp('created_at', { useTz: true }).notNullable();
    t.timestamp('updated_at', { useTz: true }).notNullable();
    t.unique(['field_id', 'season']);
    t.index(['organisation_id', 'season']);
  });
  // Append-only: the app has no route that updates or deletes these rows.
  await knex.schema.createTable('change_history', (t) => {
    t.bigIncrements('seq').primary();
    t.string('organisation_id', 36).notNullable().references('organisations.id').onDelete('RESTRICT');
    t.string('entity_type', 32).notNullable(); // ranch | field | planting
    t.string('entity_id', 36).notNullable();
    t.string('action', 16).notNullable(); // create | update | delete | import
    t.string('user_id', 36).nullable();
    t.string('user_name', 200).nullable();
    t.timestamp('at', { useTz: true }).notNullable();
    t.text('before').nullable(); // JSON of the record before the change
    t.text('after').nullable(); // JSON after
    t.string('summary', 500).notNullable();
    t.index(['organisation_id', 'at']);
    t.index(['organisation_id', 'entity_type', 'entity_id']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('change_history');
  await knex.schema.dropTable('plantings');
  await knex.schema.dropTable('fields');
  await knex.schema.dropTable('ranches');
  await knex.schema.dropTable('crops');
}
