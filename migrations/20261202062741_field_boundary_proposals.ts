import type { Knex } from 'knex';

/*
 * Boundaries traced on the phone wait here for the office: a sampler walks a field's edge, the
 * phone sends the simplified outline with the id it made (so a retried send never makes a second
 * proposal), and a clerk or admin accepts it (it becomes the field's boundary, written to the
 * change history like any boundary edit) or declines it with a reason. The field is referenced
 * through (organisation_id, field_id), so a proposal can never point at another organisation's field.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('field_boundary_proposals', (t) => {
    t.string('id', 36).primary();
    t.string('organisation_id', 36).notNullable().references('organisations.id').onDelete('RESTRICT');
    t.string('field_id', 36).notNullable();
    t.text('boundary').notNullable(); // GeoJSON Polygon, WGS84
    t.double('area_ha').notNullable();
    t.integer('points_recorded').notNullable(); // positions recorded while walking, before simplifying
    t.double('median_accuracy_m').nullable();
    t.string('status', 16).notNullable(); // pending | accepted | declined
    t.string('content_hash', 64).notNullable();
    t.string('proposed_by', 36).nullable().references('users.id').onDelete('SET NULL');
    t.string('proposed_by_name', 200).notNullable();
    t.timestamp('proposed_at', { useTz: true }).notNullable();
    t.string('decided_by', 36).nullable().references('users.id').onDelete('SET NULL');
    t.string('decided_by_name', 200).nullable();
    t.timestamp('decided_at', { useTz: true }).nullable();
    t.text('decline_reason').nullable();
    t.unique(['organisation_id', 'id']);
    t.foreign(['organisation_id', 'field_id']).references(['organisation_id', 'id']).inTable('fields').onDelete('CASCADE');
    t.index(['organisation_id', 'field_id', 'status']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('field_boundary_proposals');
}
