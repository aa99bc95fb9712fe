import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('organisations', (t) => {
    t.string('id', 36).primary();
    t.string('name', 200).notNullable();
    t.timestamp('created_at', { useTz: true }).notNullable();
  });
  await knex.schema.createTable('users', (t) => {
    t.string('id', 36).primary();
    t.string('organisation_id', 36).notNullable().references('organisations.id').onDelete('RESTRICT');
    t.string('name', 200).notNullable();
    // Stored lower-cased: one account per address, whatever the capitals typed.
    t.string('email', 320).notNullable().unique();
    t.string('password_hash', 100).nullable(); // null until an invited user sets a password
    t.string('role', 16).notNullable();
    t.boolean('active').notNullable().defaultTo(true);
    t.string('units', 8).notNullable().defaultTo('us');
    t.string('language', 8).notNullable().defaultTo('en');
    t.timestamp('last_sign_in_at', { useTz: true }).nullable();
    t.timestamp('created_at', { useTz: true }).notNullable();
    t.timestamp('updated_at', { useTz: true }).notNullable();
    t.index(['organisation_id', 'role']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('users');
  await knex.schema.dropTable('organisations');
}
