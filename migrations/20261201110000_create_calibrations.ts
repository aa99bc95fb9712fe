import type { Knex } from 'knex';

/*
 * Calibrations: the paired points an agronomist uploads (a data set), the calibrations fitted to
 * them (draft → published → retired; a published one is never changed), which published version an
 * organisation's estimates use per crop (and optionally variety), and uploads held for preview.
 * Variety and region are '' when not given (not NULL), so that the unique keys below hold on both
 * SQLite and PostgreSQL, where NULLs never collide.
 */
export async function up(knex: Knex): Promise<void> {
  // A CSV waiting for its preview to be confirmed; deleted when saved or after a day.
  await knex.schema.createTable('calibration_uploads', (t) => {
    t.string('id', 36).primary();
    t.string('organisation_id', 36).notNullable().references('organisations.id').onDelete('CASCADE');
    t.string('uploaded_by', 36).notNullable().references('users.id').onDelete('CASCADE');
    t.string('file_name', 255).notNullable();
    t.text('content').notNullable(); // the file decoded as UTF-8
    t.integer('byte_size').notNullable();
    t.timestamp('created_at', { useTz: true }).notNullable();
    t.index(['organisation_id', 'created_at']);
  });
  await knex.schema.createTable('calibration_datasets', (t) => {
    t.string('id', 36).primary();
    t.string('organisation_id', 36).notNullable().references('organisations.id').onDelete('RESTRICT');
    t.string('name', 200).notNullable();
    t.string('file_name', 255).nullable();
    t.string('length_unit', 8).notNullable(); // unit of the uploaded column: cm | in
    t.string('biomass_unit', 8).notNullable(); // kg_ha | lb_ac | g_m2
    t.integer('row_count').notNullable();
    t.text('points').notNullable(); // JSON [{x: cm, y: kg/ha, site?, date?, stage?, note?, line}]
    t.string('uploaded_by', 36).nullable().references('users.id').onDelete('SET NULL');
    t.timestamp('created_at', { useTz: true }).notNullable();
    t.index(['organisation_id']);
  });
  await knex.schema.createTable('calibrations', (t) => {
    t.string('id', 36).primary();
    t.string('organisation_id', 36).notNullable().references('organisations.id').onDelete('RESTRICT');
    t.string('dataset_id', 36).notNullable().references('calibration_datasets.id').onDelete('RESTRICT');
    t.string('crop', 32).notNullable().references('crops.code');
    t.string('variety', 200).notNullable().defaultTo('');
    t.string('region', 200).notNullable().defaultTo('');
    t.string('status', 16).notNullable(); // draft | published | retired
    t.integer('version').nullable(); // 1, 2, … per organisation, crop, variety and region; set at publishing
    t.string('label', 200).nullable(); // the version's name
    t.string('model', 16).nullable(); // linear | power | exponential | quadratic; null if none fits
    t.text('fit').nullable(); // the estimation core's Fit as JSON
    t.integer('n').notNullable();
    t.double('r_squared').nullable();
    t.double('residual_std_error').nullable();
    t.double('loo_rmse').nullable();
    t.double('x_min').notNullable(); // cm
    t.double('x_max').notNullable();
    t.string('created_by', 36).nullable().references('users.id').onDelete('SET NULL');
    t.timestamp('created_at', { useTz: true }).notNullable();
    t.timestamp('updated_at', { useTz: true }).notNullable();
    t.string('published_by', 36).nullable().references('users.id').onDelete('SET NULL');
    t.timestamp('published_at', { useTz: true }).nullable();
    t.string('retired_by', 36).nullable().references('users.id').onDelete('SET NULL');
    t.timestamp('retired_at', { useTz: true }).nullable();
    t.unique(['organisation_id', 'crop', 'variety', 'region', 'version']);
    t.index(['organisation_id', 'status']);
  });
  await knex.schema.createTable('calibration_assignments', (t) => {
    t.string('organisation_id', 36).notNullable().references('organisations.id').onDelete('RESTRICT');
    t.string('crop', 32).notNullable().references('crops.code');
    t.string('variety', 200).notNullable().defaultTo(''); // '' = every variety of the crop
    t.string('calibration_id', 36).notNullable().references('calibrations.id').onDelete('RESTRICT');
    t.string('assigned_by', 36).nullable().references('users.id').onDelete('SET NULL');
    t.timestamp('assigned_at', { useTz: true }).notNullable();
    t.primary(['organisation_id', 'crop', 'variety']);
    t.index(['calibration_id']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('calibration_assignments');
  await knex.schema.dropTable('calibrations');
  await knex.schema.dropTable('calibration_datasets');
  await knex.schema.dropTable('calibration_uploads');
}
